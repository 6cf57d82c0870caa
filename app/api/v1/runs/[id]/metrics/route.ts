import { z } from 'zod';
import { requireCaller } from '@/src/server/auth/caller';
import { resolveRunScope } from '@/src/server/auth/scope';
import { parseOrThrow, route } from '@/src/server/http/handler';
import { getMetricsExport } from '@/src/server/services/run-page';
import { runIdSchema } from '@/src/schemas/runs';

export const dynamic = 'force-dynamic';

const metricsQuerySchema = z.object({
  variable: z.string().trim().min(1).max(200).optional(),
  format: z.enum(['csv', 'json']).default('csv'),
});

/** The full per-step metrics of one variable (or all) as a CSV or JSON download. */
export const GET = route<{ id: string }>(async (request, params) => {
  const caller = await requireCaller(request);
  const id = parseOrThrow(runIdSchema, 'run', params.id);
  const scope = await resolveRunScope(caller, id);
  const query = parseOrThrow(metricsQuerySchema, 'query', Object.fromEntries(new URL(request.url).searchParams));
  const file = await getMetricsExport(scope, query.variable, query.format);
  return new Response(file.body, {
    status: 200,
    headers: {
      'content-type': file.contentType,
      'content-disposition': `attachment; filename="${file.fileName}"`,
      'cache-control': 'no-store',
    },
  });
});
