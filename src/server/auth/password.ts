import 'server-only';
import bcrypt from 'bcryptjs';
import { COMMON_PASSWORDS } from './common-passwords';

export const MIN_PASSWORD_LENGTH = 12;
export const MAX_PASSWORD_LENGTH = 72; // bcrypt reads at most 72 bytes
const BCRYPT_COST = 11;

/** A reason the password is refused, or null when it is acceptable. */
export function passwordProblem(password: string, email?: string): string | null {
  if (password.length < MIN_PASSWORD_LENGTH) return `Use at least ${MIN_PASSWORD_LENGTH} characters.`;
  if (Buffer.byteLength(password, 'utf8') > MAX_PASSWORD_LENGTH) return `Use at most ${MAX_PASSWORD_LENGTH} bytes.`;
  const lower = password.toLowerCase();
  if (COMMON_PASSWORDS.has(lower)) return 'This password is on lists of common passwords; choose another.';
  if (new Set(lower).size <= 2) return 'This password repeats one or two characters; choose another.';
  if (email && lower.includes(email.toLowerCase().split('@')[0]!) && lower.length < email.length + 6) {
    return 'Do not base the password on your e-mail address.';
  }
  return null;
}

export function hashPassword(password: string): Promise<string> {
  return bcrypt.hash(password, BCRYPT_COST);
}

export function verifyPassword(password: string, hash: string): Promise<boolean> {
  return bcrypt.compare(password, hash);
}

/** A hash to compare against when the account does not exist, so timing does not tell. */
export const DUMMY_HASH = '$2b$11$CwTycUXWue0Thq9StjUM0uJ8.QT4Sgu3zCcO0IFTqFh7aGm6xVrXW';
