import { requireCaller, requireUserCaller } from '@/src/server/auth/caller';
import { resolveProjectScope } from '@/src/server/auth/scope';
import { json, parseOrThrow, readJson, route } from '@/src/server/http/handler';
import { acceptBaseline } from '@/src/server/services/baselines';
import { baselineRequestSchema, slugSchema } from '@/src/schemas/runs';

export const dynamic = 'force-dynamic';

/** Accepts a run as the baseline of its case: signed-in maintainers only, never a CI token. */
export const POST = route<{ case: string }>(async (request, params) => {
  const caller = requireUserCaller(await requireCaller(request));
  const caseName = parseOrThrow(slugSchema, 'case', decodeURIComponent(params.case));
  const body = parseOrThrow(baselineRequestSchema, 'baseline', await readJson(request));
  const scope = await resolveProjectScope(caller, body, 'maintainer');
  const baseline = await acceptBaseline({
    actor: { workspaceId: scope.workspaceId, userId: caller.userId },
    projectId: scope.projectId,
    caseName,
    runId: body.run,
    branch: body.branch,
  });
  return json({ baseline }, 200);
});
