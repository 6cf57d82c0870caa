import { z } from 'zod';
import { requireCaller } from '@/src/server/auth/caller';
import { resolveRunScope } from '@/src/server/auth/scope';
import { json, parseOrThrow, route } from '@/src/server/http/handler';
import { getRunStep } from '@/src/server/services/reports';
import { runIdSchema, stepQuerySchema } from '@/src/schemas/runs';

export const dynamic = 'force-dynamic';

const stepNumberSchema = z.coerce.number().int('the step must be a whole number').min(0);

/** One step's values of a variable, reduced for a chart (`?variable=&points=`). */
export const GET = route<{ id: string; step: string }>(async (request, params) => {
  const caller = await requireCaller(request);
  const id = parseOrThrow(runIdSchema, 'run', params.id);
  const step = parseOrThrow(stepNumberSchema, 'step', params.step);
  const scope = await resolveRunScope(caller, id);
  const query = parseOrThrow(stepQuerySchema, 'query', Object.fromEntries(new URL(request.url).searchParams));
  return json(await getRunStep(scope, step, query.variable, query.points));
});
