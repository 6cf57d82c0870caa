import { z } from 'zod';
import { requireCaller } from '@/src/server/auth/caller';
import { resolveRunScope } from '@/src/server/auth/scope';
import { json, parseOrThrow, route } from '@/src/server/http/handler';
import { getStepView } from '@/src/server/services/run-fields';
import { runIdSchema, stepQuerySchema } from '@/src/schemas/runs';

export const dynamic = 'force-dynamic';

const stepNumberSchema = z.coerce.number().int('the step must be a whole number').min(0);
const cellSchema = z.coerce.number().int('a cell index must be a whole number').min(0);

/** The original query plus optional `slice` (3D plane) and `from`/`to` (1D cell window); all old requests answer as before. */
const stepViewQuerySchema = stepQuerySchema.extend({
  slice: cellSchema.optional(),
  from: cellSchema.optional(),
  to: cellSchema.optional(),
});

/** One step's values of a variable, reduced for a chart (`?variable=&points=&slice=&from=&to=`). */
export const GET = route<{ id: string; step: string }>(async (request, params) => {
  const caller = await requireCaller(request);
  const id = parseOrThrow(runIdSchema, 'run', params.id);
  const step = parseOrThrow(stepNumberSchema, 'step', params.step);
  const scope = await resolveRunScope(caller, id);
  const query = parseOrThrow(stepViewQuerySchema, 'query', Object.fromEntries(new URL(request.url).searchParams));
  return json(await getStepView(scope, step, query));
});
