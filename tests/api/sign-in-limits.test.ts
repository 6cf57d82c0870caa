/**
 * The per-address sign-in limit: 20 failed password attempts from one client address in 15
 * minutes block that address for every account, right password included, while other
 * addresses are unaffected. The address is the one the nearest proxy reported (the last entry of
 * X-Forwarded-For), so a client cannot dodge the limit by writing its own entry first.
 */
import { randomUUID } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import { MAX_FAILURES_PER_ADDRESS } from '@/src/server/auth/rate-limit';
import { createTestUser, signInCookie } from '../support/users';
import { testAddress } from '../support/workspaces';

async function failFrom(ip: string, times: number): Promise<void> {
  for (let i = 0; i < times; i++) {
    // A different, non-existent account each time: only the address limit can add these up.
    await expect(
      signInCookie({ email: `guess-${randomUUID().slice(0, 8)}@saltings.example`, password: 'not-the-password' }, ip),
    ).rejects.toThrow(/sign-in failed/);
  }
}

describe('per-address sign-in limit', () => {
  it('blocks an address after 20 failures across accounts, even with the right password, and no other address', async () => {
    const ip = testAddress();
    const user = await createTestUser();
    await failFrom(ip, MAX_FAILURES_PER_ADDRESS - 1);
    // One below the limit the right password still works from there.
    await expect(signInCookie(user, ip)).resolves.toContain('session-token');
    await failFrom(ip, 1);
    await expect(signInCookie(user, ip)).rejects.toThrow(/rate_limited/);
    await expect(signInCookie(user, testAddress())).resolves.toContain('session-token');
  });

  it('counts the address the proxy appended, not one the client wrote in front of it', async () => {
    const ip = testAddress();
    const user = await createTestUser();
    await failFrom(ip, MAX_FAILURES_PER_ADDRESS);
    await expect(signInCookie(user, `203.0.113.${Math.floor(Math.random() * 250)}, ${ip}`)).rejects.toThrow(
      /rate_limited/,
    );
  });
});
