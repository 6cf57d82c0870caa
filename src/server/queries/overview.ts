import 'server-only';
import { sql, type SQL } from 'drizzle-orm';
import { getDb } from '@/db/client';
import { worstFindingOrder } from './finding-order';

export type VerdictFilter = 'problems' | 'fail' | 'warn' | 'error' | 'pass' | 'all';

export interface OverviewFilters {
  workspaceId: string;
  project?: string;
  branch?: string;
  verdict: VerdictFilter;
  from?: Date;
  to?: Date;
  sort: 'newest' | 'oldest';
  page: number;
  pageSize: number;
}

export interface OverviewRow {
  buildId: string;
  key: string;
  branch: string;
  commit: string;
  verdict: string | null;
  startedAt: Date;
  projectSlug: string;
  projectName: string;
  casesTotal: number;
  casesFailing: number;
  worstFinding: string | null;
  worstRunId: string | null;
}

function verdictCondition(v: VerdictFilter): SQL | undefined {
  if (v === 'all') return undefined;
  if (v === 'problems') return sql`b.verdict in ('fail', 'warn', 'error')`;
  return sql`b.verdict = ${v}`;
}

/**
 * Builds of a workspace for the overview, newest first by default, one page at a time. The
 * per-build counts and the worst finding come from lateral sub-queries over that page only, so
 * the cost stays with the page size, not the number of builds (builds_workspace_* indexes).
 */
export async function listOverviewBuilds(f: OverviewFilters): Promise<{ rows: OverviewRow[]; total: number }> {
  const conditions: SQL[] = [sql`b.workspace_id = ${f.workspaceId}`];
  const verdict = verdictCondition(f.verdict);
  if (verdict) conditions.push(verdict);
  if (f.project) conditions.push(sql`p.slug = ${f.project}`);
  if (f.branch) conditions.push(sql`b.branch = ${f.branch}`);
  if (f.from) conditions.push(sql`b.started_at >= ${f.from.toISOString()}::timestamptz`);
  if (f.to) conditions.push(sql`b.started_at < ${f.to.toISOString()}::timestamptz`);
  const where = sql.join(conditions, sql` and `);
  const order = f.sort === 'oldest' ? sql`b.started_at asc, b.id asc` : sql`b.started_at desc, b.id desc`;
  const db = getDb();
  const rows = await db.execute<{
    build_id: string;
    key: string;
    branch: string;
    commit: string;
    verdict: string | null;
    started_at: string;
    project_slug: string;
    project_name: string;
    cases_total: number;
    cases_failing: number;
    worst_finding: string | null;
    worst_run_id: string | null;
  }>(sql`
    select b.id as build_id, b.key, b.branch, b.commit, b.verdict, b.started_at,
      p.slug as project_slug, p.name as project_name,
      coalesce(c.total, 0)::int as cases_total, coalesce(c.failing, 0)::int as cases_failing,
      w.message as worst_finding, w.run_id as worst_run_id
    from builds b
    join projects p on p.id = b.project_id
    left join lateral (
      select count(*) as total, count(*) filter (where latest.verdict in ('fail', 'error')) as failing
      from (select distinct on (r.case_id) r.verdict from runs r where r.build_id = b.id order by r.case_id, r.created_at desc) latest
    ) c on true
    left join lateral (
      select f.message, f.run_id from findings f join runs r on r.id = f.run_id
      where r.build_id = b.id order by ${worstFindingOrder()} limit 1
    ) w on true
    where ${where}
    order by ${order}
    limit ${f.pageSize} offset ${(f.page - 1) * f.pageSize}`);
  const [count] = await db.execute<{ n: number }>(sql`
    select count(*)::int as n from builds b join projects p on p.id = b.project_id where ${where}`);
  return {
    total: count?.n ?? 0,
    rows: rows.map((r) => ({
      buildId: r.build_id,
      key: r.key,
      branch: r.branch,
      commit: r.commit,
      verdict: r.verdict,
      startedAt: new Date(r.started_at),
      projectSlug: r.project_slug,
      projectName: r.project_name,
      casesTotal: r.cases_total,
      casesFailing: r.cases_failing,
      worstFinding: r.worst_finding,
      worstRunId: r.worst_run_id,
    })),
  };
}

/** Branch names seen in a workspace, for the filter. */
export async function listBranches({ workspaceId }: { workspaceId: string }): Promise<string[]> {
  const rows = await getDb().execute<{ branch: string }>(sql`
    select branch from builds where workspace_id = ${workspaceId} group by branch order by count(*) desc limit 50`);
  return rows.map((r) => r.branch);
}

export interface WorkspaceCounts {
  projects: number;
  builds: number;
  failingBuilds7d: number;
}

export async function getWorkspaceCounts({ workspaceId }: { workspaceId: string }): Promise<WorkspaceCounts> {
  const [row] = await getDb().execute<{ projects: number; builds: number; failing: number }>(sql`
    select (select count(*) from projects where workspace_id = ${workspaceId})::int as projects,
      (select count(*) from builds where workspace_id = ${workspaceId})::int as builds,
      (select count(*) from builds where workspace_id = ${workspaceId} and verdict in ('fail', 'error')
         and started_at > now() - interval '7 days')::int as failing`);
  return { projects: row?.projects ?? 0, builds: row?.builds ?? 0, failingBuilds7d: row?.failing ?? 0 };
}
