import 'server-only';
import { transaction } from '@/db/client';
import { AppError } from '../errors';
import { insertAuditEvent } from '../queries/audit';
import { getCaseByName, upsertBaseline } from '../queries/projects';
import { getRunContext } from '../queries/runs';

export interface BaselineActor {
  workspaceId: string;
  userId?: string | null;
}

/**
 * Makes a finished run the baseline of its case on a branch (its build's branch by default).
 * Later runs of the case on that branch are compared with it. A run that ended in `error` has no
 * metrics to compare with and cannot be accepted.
 */
export async function acceptBaseline(input: {
  actor: BaselineActor;
  projectId: string;
  caseName: string;
  runId: string;
  branch?: string;
}) {
  const { actor } = input;
  const ctx = await getRunContext({ workspaceId: actor.workspaceId, id: input.runId });
  if (!ctx || ctx.run.projectId !== input.projectId)
    throw new AppError('not_found:run', `No run ${input.runId} in this project.`);
  const kase = await getCaseByName({
    workspaceId: actor.workspaceId,
    projectId: input.projectId,
    name: input.caseName,
  });
  if (!kase || kase.id !== ctx.run.caseId) {
    throw new AppError(
      'invalid:baseline',
      `Run ${input.runId} is a run of case "${ctx.caseName}", not of "${input.caseName}".`,
    );
  }
  if (ctx.run.status !== 'done') {
    throw new AppError(
      'invalid:baseline',
      `Only an analysed run can become a baseline; this one is ${ctx.run.status}.`,
    );
  }
  const branch = input.branch ?? ctx.branch;
  await transaction(async (tx) => {
    await upsertBaseline(
      { workspaceId: actor.workspaceId, caseId: kase.id, branch, runId: ctx.run.id, acceptedBy: actor.userId ?? null },
      tx,
    );
    await insertAuditEvent(
      {
        workspaceId: actor.workspaceId,
        actorUserId: actor.userId ?? null,
        action: 'baseline.accept',
        targetType: 'case',
        targetId: kase.id,
        details: { case: kase.name, branch, runId: ctx.run.id, verdict: ctx.run.verdict },
      },
      tx,
    );
  });
  return { case: kase.name, branch, runId: ctx.run.id };
}
