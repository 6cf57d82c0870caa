import 'server-only';
import { z } from 'zod';
import { appUrls, unsubscribeUrls } from '@/src/lib/app-urls';
import { deriveKey, signToken, verifyToken } from '@/src/lib/signed-token';
import { env } from '../env';
import { getGlobalSubscription, switchOffGlobalSubscription } from '../queries/subscriptions';

/**
 * Unsubscribe links that work without signing in. The link carries a signed, expiring token
 * naming one subscription and what to stop (`digest` or `alerts`); the signature is the only
 * proof needed, which is what one-click unsubscribe (RFC 8058) requires. Tokens are not stored:
 * a tampered one fails the signature check, an old one its expiry.
 */

export type UnsubscribeScope = 'digest' | 'alerts';

/** How long a link in a mail keeps working. */
export const UNSUBSCRIBE_TOKEN_DAYS = 90;

const tokenPayloadSchema = z.object({ sid: z.uuid(), scope: z.enum(['digest', 'alerts']) });

function signingKey(): Buffer {
  const secret = env().AUTH_SECRET;
  if (!secret) {
    throw new Error(
      'AUTH_SECRET is not set: it signs the unsubscribe links of notification mails (32+ random characters, see .env.example).',
    );
  }
  return deriveKey(secret, 'unsubscribe');
}

export function unsubscribeToken(subscriptionId: string, scope: UnsubscribeScope, now: Date = new Date()): string {
  const expires = new Date(now.getTime() + UNSUBSCRIBE_TOKEN_DAYS * 86_400_000);
  return signToken(signingKey(), { sid: subscriptionId, scope }, expires);
}

/** The page link (for the mail body) and the one-click POST target (for List-Unsubscribe). */
export function unsubscribeLinks(subscriptionId: string, scope: UnsubscribeScope): { page: string; oneClick: string } {
  return unsubscribeUrls(env().APP_URL, unsubscribeToken(subscriptionId, scope));
}

/** The headers every notification mail carries (RFC 2369 List-Unsubscribe, RFC 8058 one-click). */
export function listHeaders(input: { oneClick: string; listName: string; listId: string }): Record<string, string> {
  return {
    'List-Unsubscribe': `<${input.oneClick}>`,
    'List-Unsubscribe-Post': 'List-Unsubscribe=One-Click',
    'List-Id': `${input.listName.replace(/[^\w .,-]/g, ' ').trim()} <${input.listId}>`,
    'Auto-Submitted': 'auto-generated',
  };
}

/** `digest.<project>.<workspace>.<host>`: the List-Id of a project's mails of one kind. */
export function listIdFor(kind: 'digest' | 'alerts', workspaceSlug: string, projectSlug: string): string {
  const host = new URL(env().APP_URL).hostname || 'varigate.invalid';
  const clean = (s: string) =>
    s
      .toLowerCase()
      .replace(/[^a-z0-9-]/g, '-')
      .slice(0, 60);
  return `${kind}.${clean(projectSlug)}.${clean(workspaceSlug)}.${host}`;
}

export type UnsubscribeView =
  | { ok: false; reason: 'malformed' | 'signature' | 'expired' | 'gone' }
  | {
      ok: true;
      scope: UnsubscribeScope;
      /** The address, partly masked: the link may have been forwarded. */
      maskedEmail: string;
      projectName: string;
      workspaceName: string;
      /** Whether the mail this link stops is still on. */
      active: boolean;
      settingsUrl: string;
    };

export function maskEmail(email: string): string {
  const at = email.lastIndexOf('@');
  if (at <= 0) return '***';
  const local = email.slice(0, at);
  return `${local.slice(0, Math.min(2, local.length))}***${email.slice(at)}`;
}

async function resolve(token: string): Promise<UnsubscribeView & { subscriptionId?: string }> {
  const checked = verifyToken(signingKey(), token);
  if (!checked.ok) return { ok: false, reason: checked.reason };
  const payload = tokenPayloadSchema.safeParse(checked.payload);
  if (!payload.success) return { ok: false, reason: 'malformed' };
  const sub = await getGlobalSubscription({ id: payload.data.sid });
  if (!sub) return { ok: false, reason: 'gone' };
  return {
    ok: true,
    subscriptionId: sub.id,
    scope: payload.data.scope,
    maskedEmail: maskEmail(sub.email),
    projectName: sub.projectName,
    workspaceName: sub.workspaceName,
    active: payload.data.scope === 'digest' ? sub.weeklyDigest : sub.failureAlerts,
    settingsUrl: appUrls(env().APP_URL, sub.workspaceSlug).notificationSettings,
  };
}

/** What the unsubscribe page shows for a token; changes nothing. */
export async function describeUnsubscribe(token: string): Promise<UnsubscribeView> {
  const { subscriptionId: _id, ...view } = await resolve(token);
  return view;
}

/** Turns off what the token names. Idempotent: a second call changes nothing and still succeeds. */
export async function applyUnsubscribe(token: string): Promise<UnsubscribeView> {
  const resolved = await resolve(token);
  if (!resolved.ok || !resolved.subscriptionId) return resolved.ok ? { ok: false, reason: 'gone' } : resolved;
  const { subscriptionId, ...view } = resolved;
  await switchOffGlobalSubscription({
    id: subscriptionId,
    digest: view.scope === 'digest',
    alerts: view.scope === 'alerts',
  });
  return { ...view, active: false };
}
