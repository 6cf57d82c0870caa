import { z } from 'zod';
import { requireCaller } from '@/src/server/auth/caller';
import { resolveRunScope } from '@/src/server/auth/scope';
import { json, parseOrThrow, route } from '@/src/server/http/handler';
import { getGrowthView } from '@/src/server/services/run-fields';
import { runIdSchema } from '@/src/schemas/runs';

export const dynamic = 'force-dynamic';

const growthQuerySchema = z.object({
  variable: z.string().trim().min(1).max(200).optional(),
  step: z.coerce.number({ error: 'name the step: ?step=<step number>' }).int('the step must be a whole number').min(0),
  points: z.coerce.number().int().min(16).max(20_000).default(2500),
  slice: z.coerce.number().int().min(0).optional(),
});

/** Where local variation grew between `step` and the step before it, as a downsampled grid. */
export const GET = route<{ id: string }>(async (request, params) => {
  const caller = await requireCaller(request);
  const id = parseOrThrow(runIdSchema, 'run', params.id);
  const scope = await resolveRunScope(caller, id);
  const query = parseOrThrow(growthQuerySchema, 'query', Object.fromEntries(new URL(request.url).searchParams));
  return json(await getGrowthView(scope, query.step, query));
});
