import { requireCaller } from '@/src/server/auth/caller';
import { resolveRunScope } from '@/src/server/auth/scope';
import { json, parseOrThrow, route } from '@/src/server/http/handler';
import { getRunReport } from '@/src/server/services/reports';
import { runIdSchema } from '@/src/schemas/runs';

export const dynamic = 'force-dynamic';

/** Status, verdict, findings and per-variable summary of one run. */
export const GET = route<{ id: string }>(async (request, params) => {
  const caller = await requireCaller(request);
  const id = parseOrThrow(runIdSchema, 'run', params.id);
  const scope = await resolveRunScope(caller, id);
  return json(await getRunReport(scope));
});
