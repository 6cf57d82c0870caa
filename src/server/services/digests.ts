import 'server-only';
import { z } from 'zod';
import { transaction } from '@/db/client';
import { appUrls } from '@/src/lib/app-urls';
import { duePeriod, hourStart, isValidTimeZone, previewPeriod, type DigestPeriod } from '@/src/lib/digest-schedule';
import { summariseDigest } from '@/src/lib/digest-summary';
import { env } from '../env';
import {
  DIGEST_TICK_JOB,
  SEND_DIGEST_JOB,
  SWEEP_UPLOADS_JOB,
  digestDeliveryKey,
  digestTickKey,
  previewDeliveryKey,
  sendDigestKey,
  sweepUploadsKey,
} from '../jobs/notification-names';
import { logger } from '../logger';
import {
  listCaseStatesBefore,
  listDigestCaseRuns,
  listOpenFailingStreaks,
  listProjectBuildsBetween,
  listWorstFindings,
} from '../queries/digests';
import { getGlobalDeliveryByKey, hasDeliverySince } from '../queries/mail-deliveries';
import { getGlobalSubscription, listGlobalDigestTimings, type SubscriptionWithProject } from '../queries/subscriptions';
import { enqueue } from '../queue';
import { renderDigestMail } from '../templates/digest-mail';
import type { RenderedMail } from '../templates/mail-parts';
import { queueNotification } from './mail-delivery';
import { listHeaders, listIdFor, unsubscribeLinks } from './unsubscribe';

/**
 * Weekly digests. The scheduler is a job that re-enqueues itself once per UTC hour
 * (`digest-tick`); each tick enqueues one `send-digest` job per subscription whose local due
 * moment passed within the catch-up window, keyed by subscription and period, so a tick that runs
 * twice (two workers, a restart, the look-back of the next hours) adds nothing. The `send-digest`
 * job composes the mail and claims its delivery row; `deliver-mail` sends it (mail-delivery.ts).
 */

/** How long after its due moment a digest may still go out (missed ticks, late subscriptions). */
export const DIGEST_CATCH_UP_HOURS = 6;
const HOUR_MS = 3_600_000;

/**
 * Makes sure the scheduler runs: enqueues the tick of the current hour (a no-op if it exists,
 * done or not). Called at worker start-up; the tick then keeps itself going.
 */
export async function kickOffDigestScheduler(now: Date = new Date()): Promise<void> {
  const hour = hourStart(now);
  await enqueue({
    kind: DIGEST_TICK_JOB,
    payload: { hour: hour.toISOString() },
    dedupeKey: digestTickKey(hour),
    runAt: now,
    maxAttempts: 20,
  });
}

/** One tick: schedule the next one first (so a failing scan never stops the chain), then scan. */
export async function runDigestTick({ now = new Date() }: { now?: Date } = {}): Promise<{ due: number }> {
  const next = new Date(hourStart(now).getTime() + HOUR_MS);
  await enqueue({
    kind: DIGEST_TICK_JOB,
    payload: { hour: next.toISOString() },
    dedupeKey: digestTickKey(next),
    runAt: next,
    maxAttempts: 20,
  });
  // The hourly tick also starts the bucket's housekeeping (one sweep per hour, any number of workers).
  await enqueue({ kind: SWEEP_UPLOADS_JOB, payload: {}, dedupeKey: sweepUploadsKey(hourStart(now)), maxAttempts: 3 });
  return { due: await enqueueDueDigests({ now }) };
}

/**
 * Worker-side scan over every subscription with the digest on: enqueues a `send-digest` job for
 * each one due at `now` (within the catch-up window). Returns how many were due; enqueueing an
 * existing key is a no-op, so calling this any number of times is safe.
 */
export async function enqueueDueDigests({ now }: { now: Date }): Promise<number> {
  const timings = await listGlobalDigestTimings();
  let due = 0;
  for (const t of timings) {
    if (!isValidTimeZone(t.timeZone)) {
      logger.warn({ subscriptionId: t.id, timeZone: t.timeZone }, 'subscription has an unknown time zone; skipped');
      continue;
    }
    const period = duePeriod(t, now, DIGEST_CATCH_UP_HOURS);
    if (!period) continue;
    due++;
    await enqueue({
      kind: SEND_DIGEST_JOB,
      payload: {
        subscriptionId: t.id,
        periodKey: period.key,
        start: period.start.toISOString(),
        end: period.end.toISOString(),
        previousStart: period.previousStart.toISOString(),
      },
      dedupeKey: sendDigestKey(t.id, period.key),
      maxAttempts: 10,
    });
  }
  return due;
}

export const sendDigestPayloadSchema = z.object({
  subscriptionId: z.uuid(),
  periodKey: z.string().min(1),
  start: z.iso.datetime(),
  end: z.iso.datetime(),
  previousStart: z.iso.datetime(),
});

/** Composes one digest mail: the queries, the pure summary, the template. */
export async function composeDigest(
  sub: SubscriptionWithProject,
  period: DigestPeriod,
  options: { preview?: boolean; timeZone?: string } = {},
): Promise<RenderedMail> {
  const scope = { workspaceId: sub.workspaceId, projectId: sub.projectId, branch: sub.defaultBranch };
  const [runs, before, openStreaks, builds] = await Promise.all([
    listDigestCaseRuns({ ...scope, from: period.previousStart, to: period.end }),
    listCaseStatesBefore({ ...scope, before: period.previousStart }),
    listOpenFailingStreaks({ ...scope, at: period.end }),
    listProjectBuildsBetween({
      workspaceId: sub.workspaceId,
      projectId: sub.projectId,
      from: period.start,
      to: period.end,
    }),
  ]);
  const summary = summariseDigest({ start: period.start, end: period.end, runs, before, openStreaks });
  const worstFindings = await listWorstFindings({
    workspaceId: sub.workspaceId,
    runIds: summary.startedFailing.map((c) => c.runId),
  });
  const timeZone =
    options.timeZone && isValidTimeZone(options.timeZone)
      ? options.timeZone
      : isValidTimeZone(sub.timeZone)
        ? sub.timeZone
        : 'UTC';
  return renderDigestMail({
    workspaceName: sub.workspaceName,
    project: { slug: sub.projectSlug, name: sub.projectName, defaultBranch: sub.defaultBranch },
    period: { start: period.start, end: period.end },
    timeZone,
    summary,
    builds: builds.filter((b) => b.branch === sub.defaultBranch),
    otherBranchBuilds: builds.filter((b) => b.branch !== sub.defaultBranch).length,
    worstFindings,
    urls: appUrls(env().APP_URL, sub.workspaceSlug),
    unsubscribeUrl: unsubscribeLinks(sub.id, 'digest').page,
    preview: options.preview,
  });
}

function digestHeaders(sub: SubscriptionWithProject, kind: 'digest' | 'preview'): Record<string, string> {
  return {
    ...listHeaders({
      oneClick: unsubscribeLinks(sub.id, 'digest').oneClick,
      listName: `${sub.projectName} weekly digest`,
      listId: listIdFor('digest', sub.workspaceSlug, sub.projectSlug),
    }),
    'X-Varigate-Kind': kind,
  };
}

/**
 * The `send-digest` job: composes the digest of one subscription and period and claims its
 * delivery. Skips a subscription that was removed or turned off since the tick, and a period
 * whose delivery is already claimed (a retried job does not compose twice).
 */
export async function queueScheduledDigest(
  input: z.infer<typeof sendDigestPayloadSchema>,
): Promise<'queued' | 'exists' | 'skipped'> {
  const sub = await getGlobalSubscription({ id: input.subscriptionId });
  if (!sub || !sub.weeklyDigest) return 'skipped';
  const dedupeKey = digestDeliveryKey(sub.id, input.periodKey);
  if (await getGlobalDeliveryByKey({ dedupeKey })) return 'exists';
  const period: DigestPeriod = {
    key: input.periodKey,
    start: new Date(input.start),
    end: new Date(input.end),
    previousStart: new Date(input.previousStart),
  };
  const mail = await composeDigest(sub, period);
  const queued = await transaction((tx) =>
    queueNotification(
      {
        workspaceId: sub.workspaceId,
        kind: 'digest',
        dedupeKey,
        mail: { to: sub.email, ...mail, headers: digestHeaders(sub, 'digest') },
        meta: { subscriptionId: sub.id, projectId: sub.projectId, periodKey: input.periodKey, periodEnd: input.end },
      },
      tx,
    ),
  );
  return queued ? 'queued' : 'exists';
}

/**
 * "Send me a preview now": the digest of the seven days up to now, marked as a preview, to the
 * subscription's own address. At most one per subscription and minute (a double click sends one).
 */
export async function queueDigestPreview({
  sub,
  timeZone,
  now = new Date(),
}: {
  sub: SubscriptionWithProject;
  timeZone?: string;
  now?: Date;
}): Promise<boolean> {
  // One a minute: the per-minute key catches a double click, this check one across a minute boundary.
  const recent = await hasDeliverySince({
    workspaceId: sub.workspaceId,
    kind: 'preview',
    keyPrefix: previewDeliveryKey(sub.id, ''),
    since: new Date(now.getTime() - 60_000),
  });
  if (recent) return false;
  const period = previewPeriod(now);
  const mail = await composeDigest(sub, period, { preview: true, timeZone });
  const minute = now.toISOString().slice(0, 16);
  return transaction((tx) =>
    queueNotification(
      {
        workspaceId: sub.workspaceId,
        kind: 'preview',
        dedupeKey: previewDeliveryKey(sub.id, minute),
        mail: { to: sub.email, ...mail, headers: digestHeaders(sub, 'preview') },
        meta: { subscriptionId: sub.id, projectId: sub.projectId },
      },
      tx,
    ),
  );
}
