import { describe, expect, it } from 'vitest';
import { deriveKey, signToken, verifyToken } from '@/src/lib/signed-token';

const key = deriveKey('a-test-secret-that-is-long-enough-0123456789', 'unsubscribe');
const now = new Date('2026-12-01T12:00:00Z');
const later = new Date('2027-01-01T00:00:00Z');

/** Replaces one character of `s` at `index` with another base64url character. */
function flip(s: string, index: number): string {
  const c = s[index] === 'A' ? 'B' : 'A';
  return s.slice(0, index) + c + s.slice(index + 1);
}

describe('signed tokens', () => {
  it('verifies its own token and returns the payload and expiry', () => {
    const token = signToken(key, { sid: 'sub-1', scope: 'digest' }, later);
    const checked = verifyToken(key, token, now);
    expect(checked).toEqual({
      ok: true,
      payload: { sid: 'sub-1', scope: 'digest', exp: later.getTime() / 1000 },
      expiresAt: later,
    });
  });

  it('refuses a token whose payload or signature was changed', () => {
    const token = signToken(key, { sid: 'sub-1', scope: 'digest' }, later);
    const [body, mac] = token.split('.') as [string, string];
    expect(verifyToken(key, `${flip(body, 5)}.${mac}`, now)).toEqual({ ok: false, reason: 'signature' });
    expect(verifyToken(key, `${body}.${flip(mac, 3)}`, now)).toEqual({ ok: false, reason: 'signature' });
    // Another subscription's id in a payload signed for the first one.
    const forged = Buffer.from(JSON.stringify({ sid: 'sub-2', scope: 'digest', exp: later.getTime() / 1000 })).toString(
      'base64url',
    );
    expect(verifyToken(key, `${forged}.${mac}`, now)).toEqual({ ok: false, reason: 'signature' });
  });

  it('refuses a token signed with another secret or for another purpose', () => {
    const token = signToken(key, { sid: 'sub-1' }, later);
    expect(verifyToken(deriveKey('another-secret-that-is-long-enough-000000', 'unsubscribe'), token, now).ok).toBe(
      false,
    );
    expect(verifyToken(deriveKey('a-test-secret-that-is-long-enough-0123456789', 'sign-in'), token, now).ok).toBe(
      false,
    );
  });

  it('refuses an expired token, checking the expiry only after the signature', () => {
    const token = signToken(key, { sid: 'sub-1' }, now);
    expect(verifyToken(key, token, now)).toEqual({ ok: false, reason: 'expired' });
    expect(verifyToken(key, token, new Date(now.getTime() - 1000)).ok).toBe(true);
  });

  it('answers malformed for strings that are not tokens, without throwing', () => {
    for (const bad of ['', 'abc', 'a.b.c', '.x', 'x.', 'has space.abc', '%%%.abc']) {
      expect(verifyToken(key, bad, now)).toEqual({ ok: false, reason: 'malformed' });
    }
  });
});
