import 'server-only';
import { createHash } from 'node:crypto';
import { z } from 'zod';
import { transaction, type Executor } from '@/db/client';
import { appUrls } from '@/src/lib/app-urls';
import { env } from '../env';
import { BUILD_ALERTS_JOB, alertDeliveryKey, buildAlertsKey, buildAlertsWaitKey } from '../jobs/notification-names';
import {
  getGlobalAlertBuild,
  listNewlyFailingRuns,
  type AlertBuildContext,
  type NewlyFailingRun,
} from '../queries/alerts';
import { listWorstFindings } from '../queries/digests';
import { listAlertedStreaks, lockSubscriptionAlerts } from '../queries/mail-deliveries';
import { listAlertSubscriptions } from '../queries/subscriptions';
import { enqueue } from '../queue';
import { renderAlertMail } from '../templates/alert-mail';
import { queueNotification } from './mail-delivery';
import { listHeaders, listIdFor, unsubscribeLinks } from './unsubscribe';

/**
 * Failure alerts (opt-in per subscription). docs/notifications.md, "Alerts":
 *
 * - Trigger: the analysis job, in the transaction that finishes a run, enqueues `build-alerts`
 *   when the run failed on its project's default branch.
 * - Batching: the job waits (re-enqueueing itself every 15 s, for at most 6 hours) until no run
 *   of the build is queued or being analysed, then mails each subscriber once, listing every
 *   newly failing case of the build.
 * - "Newly failing": the case's latest run in the build failed, and its previous judged run on
 *   the branch (pass, warn or fail; `error` runs skipped) passed or warned, or does not exist (a
 *   new case failing on its first run is news too).
 * - De-duplication per subscriber, case and failing streak: a streak is named by the case and
 *   its last passing run before it (`<caseId>:<runId>` or `<caseId>:first`); the streak keys go
 *   into the alert's delivery row, and under a per-subscription advisory lock a streak already
 *   in an earlier alert is left out. So a case that keeps failing mails once, even when two
 *   builds of the same streak finish out of order or two workers handle them at once.
 */

const SETTLE_MS = 3_000;
const WAIT_SLOT_MS = 15_000;
const MAX_WAIT_MS = 6 * 3_600_000;

export const buildAlertsPayloadSchema = z.object({ buildId: z.uuid(), since: z.iso.datetime() });

/**
 * The hook of the analysis job: in its transaction, after the run's verdict is stored. Only a
 * failing run on the project's default branch enqueues anything.
 */
export async function queueAlertsForFinishedRun(
  input: { runId: string; buildId: string; verdict: string; branch: string; defaultBranch: string },
  tx: Executor,
): Promise<void> {
  if (input.verdict !== 'fail' || input.branch !== input.defaultBranch) return;
  const now = new Date();
  await enqueue(
    {
      kind: BUILD_ALERTS_JOB,
      payload: { buildId: input.buildId, since: now.toISOString() },
      dedupeKey: buildAlertsKey(input.runId),
      runAt: new Date(now.getTime() + SETTLE_MS),
    },
    tx,
  );
}

export const streakKey = (f: Pick<NewlyFailingRun, 'caseId' | 'previousRunId'>): string =>
  `${f.caseId}:${f.previousRunId ?? 'first'}`;

export type BuildAlertsResult = { status: 'waiting' } | { status: 'done'; newlyFailing: number; mails: number };

/** The `build-alerts` job. */
export async function processBuildAlerts(
  input: z.infer<typeof buildAlertsPayloadSchema>,
  now: Date = new Date(),
): Promise<BuildAlertsResult> {
  const build = await getGlobalAlertBuild({ buildId: input.buildId });
  if (!build || build.branch !== build.defaultBranch) return { status: 'done', newlyFailing: 0, mails: 0 };
  if (build.openRuns > 0 && now.getTime() - new Date(input.since).getTime() < MAX_WAIT_MS) {
    const slot = Math.floor(now.getTime() / WAIT_SLOT_MS) + 1;
    await enqueue({
      kind: BUILD_ALERTS_JOB,
      payload: input,
      dedupeKey: buildAlertsWaitKey(build.buildId, slot),
      runAt: new Date(slot * WAIT_SLOT_MS),
    });
    return { status: 'waiting' };
  }
  const failing = await listNewlyFailingRuns({ workspaceId: build.workspaceId, buildId: build.buildId });
  if (failing.length === 0) return { status: 'done', newlyFailing: 0, mails: 0 };
  const subscribers = await listAlertSubscriptions({ workspaceId: build.workspaceId, projectId: build.projectId });
  if (subscribers.length === 0) return { status: 'done', newlyFailing: failing.length, mails: 0 };
  const worst = await listWorstFindings({ workspaceId: build.workspaceId, runIds: failing.map((f) => f.runId) });
  let mails = 0;
  for (const sub of subscribers) {
    if (await claimAlert(build, sub, failing, worst)) mails++;
  }
  return { status: 'done', newlyFailing: failing.length, mails };
}

async function claimAlert(
  build: AlertBuildContext,
  sub: { id: string; email: string },
  failing: NewlyFailingRun[],
  worst: Record<string, string>,
): Promise<boolean> {
  return transaction(async (tx) => {
    await lockSubscriptionAlerts({ subscriptionId: sub.id }, tx);
    const keys = failing.map(streakKey);
    const already = await listAlertedStreaks(
      { workspaceId: build.workspaceId, subscriptionId: sub.id, streakKeys: keys },
      tx,
    );
    const fresh = failing.filter((f) => !already.has(streakKey(f)));
    if (fresh.length === 0) return false;
    const freshKeys = fresh.map(streakKey).sort();
    const hash = createHash('sha256').update(freshKeys.join('\n')).digest('hex').slice(0, 16);
    const links = unsubscribeLinks(sub.id, 'alerts');
    const mail = renderAlertMail({
      workspaceName: build.workspaceName,
      project: { slug: build.projectSlug, name: build.projectName },
      build: { key: build.buildKey, commit: build.commit, branch: build.branch, ciUrl: build.ciUrl },
      cases: fresh.map((f) => ({
        caseName: f.caseName,
        runId: f.runId,
        lastPassingBuildKey: f.previousBuildKey,
        worstFinding: worst[f.runId] ?? null,
      })),
      urls: appUrls(env().APP_URL, build.workspaceSlug),
      unsubscribeUrl: links.page,
    });
    return queueNotification(
      {
        workspaceId: build.workspaceId,
        kind: 'alert',
        dedupeKey: alertDeliveryKey(sub.id, build.buildId, hash),
        mail: {
          to: sub.email,
          ...mail,
          headers: {
            ...listHeaders({
              oneClick: links.oneClick,
              listName: `${build.projectName} failure alerts`,
              listId: listIdFor('alerts', build.workspaceSlug, build.projectSlug),
            }),
            'X-Varigate-Kind': 'alert',
          },
        },
        meta: {
          subscriptionId: sub.id,
          projectId: build.projectId,
          buildId: build.buildId,
          streaks: freshKeys,
          runIds: fresh.map((f) => f.runId),
        },
      },
      tx,
    );
  });
}
