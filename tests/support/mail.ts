import { mailCatcherUrl } from './env';

export interface CaughtMail {
  id: string;
  from: string;
  to: string;
  subject: string;
  text: string;
  html: string;
  headers: Record<string, string>;
}

export async function caughtMail(): Promise<CaughtMail[]> {
  const res = await fetch(`${mailCatcherUrl()}/messages`);
  if (!res.ok) throw new Error(`mail catcher answered ${res.status}`);
  return (await res.json()) as CaughtMail[];
}

/** Waits until a message matching `predicate` has arrived at the catcher. */
export async function waitForMail(predicate: (m: CaughtMail) => boolean, timeoutMs = 10_000): Promise<CaughtMail> {
  const deadline = Date.now() + timeoutMs;
  while (Date.now() < deadline) {
    const found = (await caughtMail()).find(predicate);
    if (found) return found;
    await new Promise((r) => setTimeout(r, 200));
  }
  throw new Error('expected mail did not arrive at the catcher');
}
