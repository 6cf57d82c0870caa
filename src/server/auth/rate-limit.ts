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

/** The client's address as the proxy in front of us reports it, else the socket's (unknown here). */
export function clientAddress(headers: Headers): string {
  const forwarded = headers.get('x-forwarded-for')?.split(',')[0]?.trim();
  return forwarded || headers.get('x-real-ip') || 'unknown';
}
