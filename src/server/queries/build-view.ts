import 'server-only';
import { sql } from 'drizzle-orm';
import { getDb } from '@/db/client';
import { worstFindingOrder } from './finding-order';

export interface BuildCaseRow {
  runId: string;
  caseName: string;
  status: string;
  verdict: string | null;
  errorMessage: string | null;
  failFindings: number;
  warnFindings: number;
  worstFinding: string | null;
}

/** The latest run of each case in a build, with its finding counts and worst finding. */
export async function listBuildCases({
  workspaceId,
  buildId,
}: {
  workspaceId: string;
  buildId: string;
}): Promise<BuildCaseRow[]> {
  const rows = await getDb().execute<{
    run_id: string;
    case_name: string;
    status: string;
    verdict: string | null;
    error_message: string | null;
    fails: number;
    warns: number;
    worst: string | null;
  }>(sql`
    select l.id as run_id, c.name as case_name, l.status, l.verdict, l.error_message,
      (select count(*) from findings f where f.run_id = l.id and f.severity = 'fail')::int as fails,
      (select count(*) from findings f where f.run_id = l.id and f.severity = 'warn')::int as warns,
      (select f.message from findings f where f.run_id = l.id order by ${worstFindingOrder()} limit 1) as worst
    from (select distinct on (r.case_id) r.* from runs r where r.workspace_id = ${workspaceId} and r.build_id = ${buildId}
          order by r.case_id, r.created_at desc) l
    join cases c on c.id = l.case_id
    order by case l.verdict when 'error' then 0 when 'fail' then 1 when 'warn' then 2 when 'pass' then 3 else 4 end, c.name`);
  return rows.map((r) => ({
    runId: r.run_id,
    caseName: r.case_name,
    status: r.status,
    verdict: r.verdict,
    errorMessage: r.error_message,
    failFindings: r.fails,
    warnFindings: r.warns,
    worstFinding: r.worst,
  }));
}

/** The build of the same project and branch that started just before this one. */
export async function getPreviousBuild({
  workspaceId,
  projectId,
  branch,
  before,
}: {
  workspaceId: string;
  projectId: string;
  branch: string;
  before: Date;
}) {
  const rows = await getDb().execute<{ id: string; key: string; verdict: string | null; started_at: string }>(sql`
    select id, key, verdict, started_at from builds
    where workspace_id = ${workspaceId} and project_id = ${projectId} and branch = ${branch} and started_at < ${before.toISOString()}::timestamptz
    order by started_at desc limit 1`);
  const r = rows[0];
  return r ? { id: r.id, key: r.key, verdict: r.verdict, startedAt: new Date(r.started_at) } : undefined;
}
