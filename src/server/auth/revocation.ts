/**
 * A session issued (JWT `iat`, whole seconds) before the user's sessions-valid-after moment is
 * void. Compared in whole seconds, so a session made in the same second as a reset survives.
 */
export function sessionRevoked(issuedAtSeconds: number, validAfter: Date | null): boolean {
  return validAfter !== null && issuedAtSeconds < Math.floor(validAfter.getTime() / 1000);
}
