import 'server-only';
import { env } from '../env';

export interface CaughtMessage {
  id: string;
  receivedAt: string;
  from: string;
  to: string;
  subject: string;
  text: string;
}

/**
 * Messages held by the local SMTP catcher. Only available where MAIL_CATCHER_URL is set, which
 * the local scripts do and a production deployment never does: there the page does not exist.
 */
export function devMailEnabled(): boolean {
  return Boolean(env().MAIL_CATCHER_URL);
}

export async function listCaughtMail(): Promise<CaughtMessage[]> {
  const url = env().MAIL_CATCHER_URL;
  if (!url) return [];
  const res = await fetch(`${url}/messages`, { cache: 'no-store' });
  if (!res.ok) throw new Error(`mail catcher answered ${res.status}`);
  const all = (await res.json()) as CaughtMessage[];
  return all.reverse();
}
