import 'server-only';
import { z } from 'zod';
import { PermanentJobError, type JobRow } from '../queue';
import { buildAlertsPayloadSchema, processBuildAlerts } from '../services/alerts';
import { queueScheduledDigest, runDigestTick, sendDigestPayloadSchema } from '../services/digests';
import { deliverNotification } from '../services/mail-delivery';

/** Handlers of the notification jobs (names and keys: notification-names.ts). Thin: the work is in services. */

function parse<T>(schema: z.ZodType<T>, job: JobRow): T {
  const parsed = schema.safeParse(job.payload);
  if (!parsed.success)
    throw new PermanentJobError(
      `${job.kind} job with an invalid payload: ${parsed.error.issues[0]?.message ?? 'unknown'}`,
    );
  return parsed.data;
}

export async function digestTickJob(): Promise<void> {
  await runDigestTick({ now: new Date() });
}

export async function sendDigestJob(job: JobRow): Promise<void> {
  await queueScheduledDigest(parse(sendDigestPayloadSchema, job));
}

export async function buildAlertsJob(job: JobRow): Promise<void> {
  await processBuildAlerts(parse(buildAlertsPayloadSchema, job));
}

const deliverPayloadSchema = z.object({ dedupeKey: z.string().min(1) });

export async function deliverMailJob(job: JobRow): Promise<void> {
  const { dedupeKey } = parse(deliverPayloadSchema, job);
  await deliverNotification({ dedupeKey, finalAttempt: job.attempts >= job.maxAttempts });
}
