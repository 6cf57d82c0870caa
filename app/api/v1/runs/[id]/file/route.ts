import { requireCaller } from '@/src/server/auth/caller';
import { resolveRunScope } from '@/src/server/auth/scope';
import { parseOrThrow, route } from '@/src/server/http/handler';
import { getRunFileUrl } from '@/src/server/services/run-page';
import { runIdSchema } from '@/src/schemas/runs';

export const dynamic = 'force-dynamic';

/** The run's raw upload: after the access check, a redirect to a short-lived object-storage URL. */
export const GET = route<{ id: string }>(async (request, params) => {
  const caller = await requireCaller(request);
  const id = parseOrThrow(runIdSchema, 'run', params.id);
  const scope = await resolveRunScope(caller, id);
  const url = await getRunFileUrl(scope);
  return new Response(null, { status: 302, headers: { location: url, 'cache-control': 'no-store' } });
});
