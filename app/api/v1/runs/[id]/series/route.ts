import { requireCaller } from '@/src/server/auth/caller';
import { resolveRunScope } from '@/src/server/auth/scope';
import { json, parseOrThrow, route } from '@/src/server/http/handler';
import { getRunSeries } from '@/src/server/services/reports';
import { runIdSchema } from '@/src/schemas/runs';

export const dynamic = 'force-dynamic';

/** The per-step metric series of one variable (`?variable=`; the first by default). */
export const GET = route<{ id: string }>(async (request, params) => {
  const caller = await requireCaller(request);
  const id = parseOrThrow(runIdSchema, 'run', params.id);
  const scope = await resolveRunScope(caller, id);
  const variable = new URL(request.url).searchParams.get('variable') ?? undefined;
  return json(await getRunSeries(scope, variable));
});
