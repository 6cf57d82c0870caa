import { requireCaller } from '@/src/server/auth/caller';
import { resolveProjectScope } from '@/src/server/auth/scope';
import { json, route } from '@/src/server/http/handler';
import { getBuildReport } from '@/src/server/services/reports';

export const dynamic = 'force-dynamic';

/** A build's runs (latest per case) and its overall verdict; `?project=` defaults to the token's; people add `?workspace=`. */
export const GET = route<{ key: string }>(async (request, params) => {
  const caller = await requireCaller(request);
  const query = new URL(request.url).searchParams;
  const scope = await resolveProjectScope(
    caller,
    { project: query.get('project') ?? undefined, workspace: query.get('workspace') ?? undefined },
    'viewer',
  );
  return json(await getBuildReport(scope, decodeURIComponent(params.key)));
});
