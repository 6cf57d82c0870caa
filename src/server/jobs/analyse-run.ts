import 'server-only';
import { z } from 'zod';
import { transaction } from '@/db/client';
import type { Policy } from '@/src/analysis';
import { logger } from '../logger';
import { refreshBuildVerdict } from '../queries/builds';
import {
  getRunContext,
  getRunWorkspace,
  getUploadForRun,
  markRunAnalysing,
  replaceRunResults,
  type AnalysisResultRows,
  type RunContext,
} from '../queries/runs';
import { PermanentJobError, type JobRow } from '../queue';
import { queueAlertsForFinishedRun } from '../services/alerts';
import {
  analyseSnapshots,
  effectivePolicy,
  errorRows,
  isInputError,
  judgeToRows,
  loadBaselineSummaries,
} from '../services/analysis';
import { withStoredSnapshots } from '../services/snapshots';

const payloadSchema = z.object({ runId: z.uuid() });

async function analyse(ctx: RunContext, policy: Policy): Promise<AnalysisResultRows> {
  const upload = await getUploadForRun({ workspaceId: ctx.run.workspaceId, runId: ctx.run.id });
  if (!upload) return errorRows('The run has no stored file.', policy);
  const stepDelayMs = Number(process.env.VARIGATE_ANALYSIS_STEP_DELAY_MS ?? 0) || undefined;
  const summaries = await withStoredSnapshots(upload, ctx.run.manifest, (reader) =>
    analyseSnapshots(reader, { policy, stepDelayMs }),
  );
  const baseline = await loadBaselineSummaries({
    workspaceId: ctx.run.workspaceId,
    caseId: ctx.run.caseId,
    runId: ctx.run.id,
    branch: ctx.branch,
    defaultBranch: ctx.defaultBranch,
  });
  return judgeToRows(summaries, policy, baseline?.summaries ?? null);
}

/**
 * Job `analyse-run`: reads the run's file from object storage, analyses and judges it, and
 * replaces the run's results and its build's verdict in one transaction. Running it again gives
 * the same rows (idempotent). Bad input ends the run with verdict `error` and the reader's
 * message; other failures are retried with backoff, and the last attempt's failure is recorded
 * on the run so it never stays "analysing" for ever.
 */
export async function analyseRunJob(job: JobRow): Promise<void> {
  const parsed = payloadSchema.safeParse(job.payload);
  if (!parsed.success) throw new PermanentJobError('analyse-run job without a valid runId');
  const { runId } = parsed.data;
  const workspaceId = await getRunWorkspace({ id: runId });
  if (!workspaceId) throw new PermanentJobError(`run ${runId} no longer exists`);
  const ctx = (await getRunContext({ workspaceId, id: runId }))!;
  await markRunAnalysing({ id: runId });

  let result: AnalysisResultRows;
  let policy: unknown = null;
  try {
    const effective = effectivePolicy(ctx.projectPolicy, ctx.casePolicy);
    policy = effective;
    result = await analyse(ctx, effective);
  } catch (err) {
    if (isInputError(err)) {
      result = errorRows((err as Error).message, policy);
    } else if (job.attempts >= job.maxAttempts) {
      logger.error({ err, runId }, 'analysis failed on its last attempt');
      result = errorRows(`Analysis failed after ${job.attempts} attempts: ${(err as Error).message}`, policy);
    } else {
      throw err;
    }
  }
  await transaction(async (tx) => {
    await replaceRunResults({ workspaceId, runId, result }, tx);
    await refreshBuildVerdict({ buildId: ctx.run.buildId }, tx);
    // Failure alerts: a failing run on the default branch queues its build's alert job (services/alerts.ts).
    await queueAlertsForFinishedRun(
      {
        runId,
        buildId: ctx.run.buildId,
        verdict: result.verdict,
        branch: ctx.branch,
        defaultBranch: ctx.defaultBranch,
      },
      tx,
    );
  });
}
