import { requireCaller } from '@/src/server/auth/caller';
import { json, parseOrThrow, readJson, route } from '@/src/server/http/handler';
import { acceptBaseline, assertMayAcceptBaseline } from '@/src/server/services/baselines';
import { baselineRequestSchema, slugSchema } from '@/src/schemas/runs';

export const dynamic = 'force-dynamic';

/** Accepts a run as the baseline of its case (maintainers, signed in). */
export const POST = route<{ case: string }>(async (request, params) => {
  const caller = await requireCaller(request);
  assertMayAcceptBaseline(caller);
  const caseName = parseOrThrow(slugSchema, 'case', decodeURIComponent(params.case));
  const body = parseOrThrow(baselineRequestSchema, 'baseline', await readJson(request));
  const baseline = await acceptBaseline({
    actor: { workspaceId: caller.workspaceId },
    projectId: caller.projectId,
    caseName,
    runId: body.run,
    branch: body.branch,
  });
  return json({ baseline }, 200);
});
