import { requireCaller } from '@/src/server/auth/caller';
import { json, route } from '@/src/server/http/handler';
import { getBuildReport } from '@/src/server/services/reports';

export const dynamic = 'force-dynamic';

/** A build's runs (latest per case) and its overall verdict; `?project=` defaults to the token's. */
export const GET = route<{ key: string }>(async (request, params) => {
  const caller = await requireCaller(request);
  const project = new URL(request.url).searchParams.get('project') ?? undefined;
  return json(await getBuildReport(caller, decodeURIComponent(params.key), project));
});
