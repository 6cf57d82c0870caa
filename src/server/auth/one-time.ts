import { createHash, randomBytes } from 'node:crypto';

/**
 * Secrets for links sent by mail (sign-in, password reset, invitations): 32 random bytes,
 * base64url in the link, only the SHA-256 stored. The secret has 256 bits of entropy, so a
 * fast hash cannot be reversed by guessing.
 */
export function newLinkSecret(): { secret: string; hash: string } {
  const secret = randomBytes(32).toString('base64url');
  return { secret, hash: hashLinkSecret(secret) };
}

export function hashLinkSecret(secret: string): string {
  return createHash('sha256').update(secret, 'utf8').digest('hex');
}

export const LINK_SECRET_PATTERN = /^[A-Za-z0-9_-]{43}$/;
