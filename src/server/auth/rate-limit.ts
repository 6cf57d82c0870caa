import 'server-only';
import { countFailedAttempts, recordSignInAttempt } from '../queries/users';

/**
 * Sign-in rate limits (common practice for password forms): at most 5 failed attempts per
 * account and 20 per client address in 15 minutes. Counted in PostgreSQL so the limit holds
 * across web instances.
 */
export const SIGN_IN_WINDOW_MS = 15 * 60 * 1000;
export const MAX_FAILURES_PER_ACCOUNT = 5;
export const MAX_FAILURES_PER_ADDRESS = 20;

export async function signInAllowed({ email, ip }: { email: string; ip: string }): Promise<boolean> {
  const since = new Date(Date.now() - SIGN_IN_WINDOW_MS);
  const { byEmail, byIp } = await countFailedAttempts({ email, ip, since });
  return byEmail < MAX_FAILURES_PER_ACCOUNT && byIp < MAX_FAILURES_PER_ADDRESS;
}

export async function noteSignInAttempt(input: { email: string; ip: string; succeeded: boolean }): Promise<void> {
  await recordSignInAttempt(input);
}

/**
 * The client's address as the proxy in front of us saw it. A proxy appends the address it saw
 * to X-Forwarded-For, after whatever the client wrote there itself, so only the last entry can
 * be trusted; the first is the client's own claim and would let anyone dodge the per-address
 * limit. (Without a proxy, Next sets the header to the socket's address when it is absent.)
 */
export function clientAddress(headers: Headers): string {
  const forwarded = headers.get('x-forwarded-for')?.split(',').at(-1)?.trim();
  return forwarded || headers.get('x-real-ip') || 'unknown';
}
