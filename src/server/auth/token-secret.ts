import { createHash, randomBytes, timingSafeEqual } from 'node:crypto';

/**
 * CI token format: `vgt_<8 hex id>_<43 base64url chars of a 32-byte secret>`. The short id is the
 * prefix shown in lists; only the SHA-256 of the whole token is stored. A fast hash is right
 * here (unlike passwords): the secret has 256 bits of entropy, so it cannot be guessed offline.
 */
const TOKEN_PATTERN = /^vgt_([0-9a-f]{8})_([A-Za-z0-9_-]{43})$/;

export interface NewTokenSecret {
  token: string;
  prefix: string;
  hash: string;
}

export function generateTokenSecret(): NewTokenSecret {
  const id = randomBytes(4).toString('hex');
  const secret = randomBytes(32).toString('base64url');
  const token = `vgt_${id}_${secret}`;
  return { token, prefix: `vgt_${id}`, hash: hashToken(token) };
}

export function hashToken(token: string): string {
  return createHash('sha256').update(token, 'utf8').digest('hex');
}

export function looksLikeToken(token: string): boolean {
  return TOKEN_PATTERN.test(token);
}

/** Constant-time comparison of two hex digests of equal length. */
export function sameHash(a: string, b: string): boolean {
  const x = Buffer.from(a, 'hex');
  const y = Buffer.from(b, 'hex');
  return x.length === y.length && timingSafeEqual(x, y);
}
