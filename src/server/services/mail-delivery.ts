import 'server-only';
import { createHash } from 'node:crypto';
import { z } from 'zod';
import { transaction, type Executor } from '@/db/client';
import { env } from '../env';
import { DELIVER_MAIL_JOB, deliverMailKey } from '../jobs/notification-names';
import { logger } from '../logger';
import { sendMail } from '../mail';
import {
  claimDelivery,
  getGlobalDeliveryByKey,
  lockGlobalDeliveryByKey,
  recordDeliveryFailure,
  recordDeliverySent,
  type NotificationKind,
} from '../queries/mail-deliveries';
import { getGlobalSubscription } from '../queries/subscriptions';
import { enqueue, PermanentJobError } from '../queue';

/**
 * Sending notification mails exactly once (docs/notifications.md, "Exactly once"):
 *
 * 1. Claim: in the transaction that decides a mail is due, insert its `mail_deliveries` row
 *    (unique dedupe key, status `queued`, the rendered message in `payload.mail`) and enqueue a
 *    `deliver-mail` job for it. A second claim with the same key inserts nothing.
 * 2. Deliver: the job locks the row (FOR UPDATE SKIP LOCKED), returns at once if it is `sent`,
 *    sends through SMTP while holding the lock, and records `sent` (or the SMTP error) before the
 *    transaction commits. A second worker finds the row locked and backs off; a worker killed
 *    before the commit leaves the row `queued` and the job is claimed again when its lease ends.
 *
 * The one window left is a crash after the SMTP server accepted the message and before the
 * commit (milliseconds): the retry sends it again. We prefer that over losing a mail, and the
 * repeat carries the same Message-ID (fixed at claim time), which lets mail systems and clients
 * fold the two copies into one.
 */

export const MAIL_MAX_ATTEMPTS = 10;

export interface OutgoingNotification {
  to: string;
  subject: string;
  text: string;
  html: string;
  headers: Record<string, string>;
}

const storedMailSchema = z.object({
  to: z.string().min(3),
  subject: z.string(),
  text: z.string(),
  html: z.string(),
  headers: z.record(z.string(), z.string()),
});

const payloadSchema = z.object({
  mail: storedMailSchema,
  subscriptionId: z.uuid().optional(),
});

/** A stable Message-ID for a delivery key, so that a re-sent copy is recognisably the same mail. */
export function messageIdFor(kind: NotificationKind, dedupeKey: string): string {
  const host = new URL(env().APP_URL).hostname || 'varigate.invalid';
  const digest = createHash('sha256').update(dedupeKey).digest('hex').slice(0, 32);
  return `<${kind}.${digest}@${host}>`;
}

/**
 * Claims a delivery and enqueues its sender, in the caller's transaction. Returns false (and
 * does nothing) when a delivery with this key exists already.
 */
export async function queueNotification(
  input: {
    workspaceId: string;
    kind: NotificationKind;
    dedupeKey: string;
    mail: OutgoingNotification;
    meta?: Record<string, unknown>;
  },
  tx: Executor,
): Promise<boolean> {
  const mail = {
    ...input.mail,
    headers: { ...input.mail.headers, 'Message-ID': messageIdFor(input.kind, input.dedupeKey) },
  };
  const id = await claimDelivery(
    {
      workspaceId: input.workspaceId,
      kind: input.kind,
      recipient: mail.to,
      subject: mail.subject,
      dedupeKey: input.dedupeKey,
      payload: { ...(input.meta ?? {}), mail },
    },
    tx,
  );
  if (id === undefined) return false;
  await enqueue(
    {
      kind: DELIVER_MAIL_JOB,
      payload: { dedupeKey: input.dedupeKey },
      dedupeKey: deliverMailKey(input.dedupeKey),
      maxAttempts: MAIL_MAX_ATTEMPTS,
    },
    tx,
  );
  return true;
}

/** The SMTP reply code of a nodemailer error (451, 550 ...), if the server gave one. */
export function smtpReplyCode(err: unknown): number | undefined {
  const code = (err as { responseCode?: unknown } | null)?.responseCode;
  return typeof code === 'number' ? code : undefined;
}

function describeError(err: unknown): string {
  const code = smtpReplyCode(err);
  const response = (err as { response?: unknown } | null)?.response;
  const message = err instanceof Error ? err.message : String(err);
  if (typeof response === 'string' && response.length > 0) return code ? `SMTP ${code}: ${response}` : response;
  return code ? `SMTP ${code}: ${message}` : message;
}

type Outcome =
  | { kind: 'sent'; messageId: string }
  | { kind: 'already-sent' }
  | { kind: 'already-failed' }
  | { kind: 'cancelled'; reason: string }
  | { kind: 'busy' }
  | { kind: 'missing' }
  | { kind: 'retry'; error: string }
  | { kind: 'permanent'; error: string };

/** A digest or alert goes out only while its subscription still wants it. */
async function cancelReason(kind: string, subscriptionId: string | undefined, tx: Executor): Promise<string | null> {
  if (kind !== 'digest' && kind !== 'alert') return null;
  if (!subscriptionId) return null;
  const sub = await getGlobalSubscription({ id: subscriptionId }, tx);
  if (!sub) return 'not sent: the subscription was removed before delivery';
  if (kind === 'digest' && !sub.weeklyDigest) return 'not sent: the weekly digest was turned off before delivery';
  if (kind === 'alert' && !sub.failureAlerts) return 'not sent: failure alerts were turned off before delivery';
  return null;
}

async function testPause(): Promise<void> {
  // Failure tests only: hold the delivery lock this long before talking to SMTP, so a test can
  // kill the worker mid-send. Never set in production.
  const ms = Number(process.env.VARIGATE_MAIL_SEND_DELAY_MS ?? 0);
  if (ms > 0) await new Promise((resolve) => setTimeout(resolve, ms));
}

/**
 * Sends one claimed delivery (the `deliver-mail` job). Throws to make the queue retry with
 * backoff (temporary SMTP failure, row locked by another worker) and `PermanentJobError` when
 * retrying cannot help (5xx reply, unreadable row).
 */
export async function deliverNotification({
  dedupeKey,
  finalAttempt,
}: {
  dedupeKey: string;
  finalAttempt: boolean;
}): Promise<Outcome> {
  const outcome = await transaction<Outcome>(async (tx) => {
    const row = await lockGlobalDeliveryByKey({ dedupeKey }, tx);
    if (!row) return (await getGlobalDeliveryByKey({ dedupeKey }, tx)) ? { kind: 'busy' } : { kind: 'missing' };
    if (row.status === 'sent') return { kind: 'already-sent' };
    // Given up on earlier (last attempt, 5xx, cancelled): a late re-run of the job sends nothing.
    // To send it after all, set the row back to `queued` and requeue its job.
    if (row.status === 'failed') return { kind: 'already-failed' };
    const parsed = payloadSchema.safeParse(row.payload);
    if (!parsed.success) {
      const error = 'not sent: the stored message is unreadable';
      await recordDeliveryFailure({ id: row.id, error, attempts: row.attempts, final: true }, tx);
      return { kind: 'permanent', error };
    }
    const reason = await cancelReason(row.kind, parsed.data.subscriptionId, tx);
    if (reason) {
      await recordDeliveryFailure({ id: row.id, error: reason, attempts: row.attempts, final: true }, tx);
      return { kind: 'cancelled', reason };
    }
    await testPause();
    const attempts = row.attempts + 1;
    try {
      const { messageId } = await sendMail(parsed.data.mail);
      await recordDeliverySent({ id: row.id, messageId, attempts }, tx);
      return { kind: 'sent', messageId };
    } catch (err) {
      const code = smtpReplyCode(err);
      const permanent = code !== undefined && code >= 500 && code < 600;
      const error = describeError(err);
      await recordDeliveryFailure({ id: row.id, error, attempts, final: permanent || finalAttempt }, tx);
      return { kind: permanent ? 'permanent' : 'retry', error };
    }
  });

  const log = logger.child({ dedupeKey });
  switch (outcome.kind) {
    case 'sent':
      log.info({ messageId: outcome.messageId }, 'notification sent');
      return outcome;
    case 'already-sent':
    case 'already-failed':
    case 'cancelled':
      return outcome;
    case 'busy':
      throw new Error('another worker is sending this mail right now; looking again later');
    case 'missing':
      throw new PermanentJobError(`no delivery row with key ${dedupeKey}`);
    case 'retry':
      log.warn({ error: outcome.error }, 'notification not sent; will retry');
      throw new Error(outcome.error);
    case 'permanent':
      log.error({ error: outcome.error }, 'notification refused; not retrying');
      throw new PermanentJobError(outcome.error);
  }
}
