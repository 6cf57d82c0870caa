import { z } from 'zod';
import { requireCaller } from '@/src/server/auth/caller';
import { resolveRunScope } from '@/src/server/auth/scope';
import { json, parseOrThrow, route } from '@/src/server/http/handler';
import { getChartSeries } from '@/src/server/services/run-page';
import { runIdSchema } from '@/src/schemas/runs';

export const dynamic = 'force-dynamic';

const chartQuerySchema = z.object({
  variable: z.string().trim().min(1).max(200).optional(),
  points: z.coerce.number().int().min(50).max(20_000).default(1500),
});

/**
 * One variable's per-step metrics for the run page's charts, with the tolerance bands of its
 * rules, thinned on the server to about `points` steps (steps with findings always kept).
 */
export const GET = route<{ id: string }>(async (request, params) => {
  const caller = await requireCaller(request);
  const id = parseOrThrow(runIdSchema, 'run', params.id);
  const scope = await resolveRunScope(caller, id);
  const query = parseOrThrow(chartQuerySchema, 'query', Object.fromEntries(new URL(request.url).searchParams));
  return json(await getChartSeries(scope, query.variable, query.points));
});
