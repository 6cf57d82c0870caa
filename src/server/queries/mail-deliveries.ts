import 'server-only';
import { and, desc, eq, gt, like, sql } from 'drizzle-orm';
import { getDb, type Executor } from '@/db/client';
import { mailDeliveries, type MailDelivery } from '@/db/schema';

/**
 * The delivery log of every mail the app sends (mail_deliveries).
 *
 * Notification mails (digests, alerts, previews): a row is claimed once per
 * dedupe key before anything is sent; the sender locks it while it talks to the SMTP server and
 * records the outcome (src/server/services/mail-delivery.ts). Rows without a workspace do not
 * occur here: every notification belongs to a project. The worker serves every workspace: the
 * `...Global...` functions find a row by its unique key, and `recordDelivery*` write to the row
 * the sender found and locked that way (by its id, inside the same transaction).
 *
 * Account mails (sign-in links, resets, invitations) are sent at once, since a person waits for
 * them; their rows only record what happened (insertDelivery, markDeliverySent/Failed).
 */

export type NotificationKind = 'digest' | 'alert' | 'preview';

/** Inserts a queued delivery unless its dedupe key exists; returns the new row's id, or undefined. */
export async function claimDelivery(
  input: {
    workspaceId: string;
    kind: NotificationKind;
    recipient: string;
    subject: string;
    dedupeKey: string;
    payload: Record<string, unknown>;
  },
  db: Executor = getDb(),
): Promise<number | undefined> {
  const rows = await db
    .insert(mailDeliveries)
    .values({ ...input, status: 'queued' })
    .onConflictDoNothing({ target: mailDeliveries.dedupeKey })
    .returning({ id: mailDeliveries.id });
  return rows[0]?.id;
}

/** Worker-side: a delivery by key, unlocked (to tell "missing" from "locked by another worker"). */
export async function getGlobalDeliveryByKey(
  { dedupeKey }: { dedupeKey: string },
  db: Executor = getDb(),
): Promise<MailDelivery | undefined> {
  const rows = await db.select().from(mailDeliveries).where(eq(mailDeliveries.dedupeKey, dedupeKey)).limit(1);
  return rows[0];
}

/**
 * Worker-side, inside a transaction: the delivery row locked FOR UPDATE, or undefined when it is
 * missing or another worker holds it (SKIP LOCKED: never wait behind a send in progress).
 */
export async function lockGlobalDeliveryByKey(
  { dedupeKey }: { dedupeKey: string },
  tx: Executor,
): Promise<MailDelivery | undefined> {
  const rows = await tx
    .select()
    .from(mailDeliveries)
    .where(eq(mailDeliveries.dedupeKey, dedupeKey))
    .limit(1)
    .for('update', { skipLocked: true });
  return rows[0];
}

export async function recordDeliverySent(
  { id, messageId, attempts }: { id: number; messageId: string; attempts: number },
  tx: Executor,
): Promise<void> {
  await tx
    .update(mailDeliveries)
    .set({ status: 'sent', messageId, attempts, sentAt: new Date(), lastError: null })
    .where(eq(mailDeliveries.id, id));
}

/** A failed attempt: `failed` when no retry will follow, else still `queued` with the error kept. */
export async function recordDeliveryFailure(
  { id, error, attempts, final }: { id: number; error: string; attempts: number; final: boolean },
  tx: Executor,
): Promise<void> {
  await tx
    .update(mailDeliveries)
    .set({ status: final ? 'failed' : 'queued', lastError: error.slice(0, 2000), attempts })
    .where(eq(mailDeliveries.id, id));
}

/**
 * Serialises alert claims for one subscription (transaction-scoped advisory lock), so that two
 * workers handling two builds of the same failing streak cannot both decide it is news.
 */
export async function lockSubscriptionAlerts(
  { subscriptionId }: { subscriptionId: string },
  tx: Executor,
): Promise<void> {
  await tx.execute(sql`select pg_advisory_xact_lock(hashtextextended(${`varigate:alerts:${subscriptionId}`}, 0))`);
}

/** Of the given failing-streak keys, those already claimed in an alert delivery to this subscription. */
export async function listAlertedStreaks(
  { workspaceId, subscriptionId, streakKeys }: { workspaceId: string; subscriptionId: string; streakKeys: string[] },
  tx: Executor,
): Promise<Set<string>> {
  if (streakKeys.length === 0) return new Set();
  const keys = sql.join(
    streakKeys.map((k) => sql`${k}`),
    sql`, `,
  );
  const rows = await tx.execute<{ k: string }>(sql`
    select distinct jsonb_array_elements_text(payload -> 'streaks') as k
    from mail_deliveries
    where workspace_id = ${workspaceId} and kind = 'alert'
      and payload ->> 'subscriptionId' = ${subscriptionId}
      and payload -> 'streaks' ?| array[${keys}]::text[]`);
  const claimed = new Set(rows.map((r) => r.k));
  return new Set(streakKeys.filter((k) => claimed.has(k)));
}

/** The latest deliveries of a workspace (the settings page shows a member their own). */
export async function listRecentDeliveries({
  workspaceId,
  recipient,
  limit = 20,
}: {
  workspaceId: string;
  recipient: string;
  limit?: number;
}): Promise<MailDelivery[]> {
  return getDb()
    .select()
    .from(mailDeliveries)
    .where(and(eq(mailDeliveries.workspaceId, workspaceId), eq(mailDeliveries.recipient, recipient)))
    .orderBy(desc(mailDeliveries.createdAt))
    .limit(limit);
}

/** Whether a delivery of this kind whose key starts with `keyPrefix` was claimed after `since`. */
export async function hasDeliverySince({
  workspaceId,
  kind,
  keyPrefix,
  since,
}: {
  workspaceId: string;
  kind: NotificationKind;
  keyPrefix: string;
  since: Date;
}): Promise<boolean> {
  const rows = await getDb()
    .select({ id: mailDeliveries.id })
    .from(mailDeliveries)
    .where(
      and(
        eq(mailDeliveries.workspaceId, workspaceId),
        eq(mailDeliveries.kind, kind),
        like(mailDeliveries.dedupeKey, `${keyPrefix.replace(/[\\%_]/g, (c) => `\\${c}`)}%`),
        gt(mailDeliveries.createdAt, since),
      ),
    )
    .limit(1);
  return rows.length > 0;
}

// ---------------------------------------------------------------- account mails, sent at once

type DeliveryKind = (typeof mailDeliveries.$inferInsert)['kind'];

export async function insertDelivery(input: {
  workspaceId?: string | null;
  kind: DeliveryKind;
  recipient: string;
  subject: string;
  dedupeKey?: string | null;
  payload?: Record<string, unknown>;
}): Promise<number | undefined> {
  const rows = await getDb()
    .insert(mailDeliveries)
    .values({
      ...input,
      workspaceId: input.workspaceId ?? null,
      dedupeKey: input.dedupeKey ?? null,
      payload: input.payload ?? {},
    })
    .onConflictDoNothing({ target: mailDeliveries.dedupeKey })
    .returning({ id: mailDeliveries.id });
  return rows[0]?.id;
}

export async function markDeliverySent({ id, messageId }: { id: number; messageId: string }): Promise<void> {
  await getDb()
    .update(mailDeliveries)
    .set({ status: 'sent', messageId, sentAt: new Date() })
    .where(eq(mailDeliveries.id, id));
}

export async function markDeliveryFailed({
  id,
  error,
  attempts,
}: {
  id: number;
  error: string;
  attempts: number;
}): Promise<void> {
  await getDb()
    .update(mailDeliveries)
    .set({ status: 'failed', lastError: error.slice(0, 2000), attempts })
    .where(eq(mailDeliveries.id, id));
}
