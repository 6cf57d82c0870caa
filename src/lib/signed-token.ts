import { createHmac, timingSafeEqual } from 'node:crypto';

/**
 * Small signed, expiring tokens for links that must work without signing in (unsubscribe).
 * Format: `<base64url(JSON payload)>.<base64url(HMAC-SHA256(purpose-key, payload part))>`, the
 * payload carrying its expiry as `exp` (Unix seconds). Nothing is stored: the signature is the
 * proof, the expiry bounds how long a leaked link is worth anything.
 *
 * The key is derived per purpose from the application secret, so a token made for one purpose
 * never verifies for another even if the payloads look alike.
 */

export type TokenCheck<T> =
  { ok: true; payload: T; expiresAt: Date } | { ok: false; reason: 'malformed' | 'signature' | 'expired' };

export function deriveKey(secret: string, purpose: string): Buffer {
  return createHmac('sha256', secret).update(`varigate:${purpose}:v1`).digest();
}

function sign(key: Buffer, body: string): string {
  return createHmac('sha256', key).update(body).digest('base64url');
}

export function signToken(key: Buffer, payload: Record<string, unknown>, expiresAt: Date): string {
  const body = Buffer.from(JSON.stringify({ ...payload, exp: Math.floor(expiresAt.getTime() / 1000) })).toString(
    'base64url',
  );
  return `${body}.${sign(key, body)}`;
}

/** Checks the signature first (constant time), then the expiry; never throws. */
export function verifyToken<T = Record<string, unknown>>(
  key: Buffer,
  token: string,
  now: Date = new Date(),
): TokenCheck<T> {
  const parts = token.split('.');
  if (parts.length !== 2 || !parts[0] || !parts[1] || !/^[A-Za-z0-9_-]+$/.test(parts[0] + parts[1]))
    return { ok: false, reason: 'malformed' };
  const [body, mac] = parts as [string, string];
  const expected = Buffer.from(sign(key, body), 'base64url');
  const given = Buffer.from(mac, 'base64url');
  if (given.length !== expected.length || !timingSafeEqual(given, expected)) return { ok: false, reason: 'signature' };
  let payload: unknown;
  try {
    payload = JSON.parse(Buffer.from(body, 'base64url').toString('utf8'));
  } catch {
    return { ok: false, reason: 'malformed' };
  }
  if (typeof payload !== 'object' || payload === null) return { ok: false, reason: 'malformed' };
  const exp = (payload as { exp?: unknown }).exp;
  if (typeof exp !== 'number') return { ok: false, reason: 'malformed' };
  if (exp * 1000 <= now.getTime()) return { ok: false, reason: 'expired' };
  return { ok: true, payload: payload as T, expiresAt: new Date(exp * 1000) };
}
