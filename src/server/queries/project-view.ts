import 'server-only';
import { sql } from 'drizzle-orm';
import { getDb } from '@/db/client';

export interface DailyPassRate {
  day: string;
  builds: number;
  passed: number;
}

/** Finished builds per day on a branch over the last `days` days, and how many passed (pass or warn). */
export async function listDailyPassRates({
  workspaceId,
  projectId,
  branch,
  days,
}: {
  workspaceId: string;
  projectId: string;
  branch: string;
  days: number;
}): Promise<DailyPassRate[]> {
  const rows = await getDb().execute<{ day: string; builds: number; passed: number }>(sql`
    select to_char(date_trunc('day', started_at), 'YYYY-MM-DD') as day, count(*)::int as builds,
      count(*) filter (where verdict in ('pass', 'warn'))::int as passed
    from builds
    where workspace_id = ${workspaceId} and project_id = ${projectId} and branch = ${branch}
      and verdict is not null and started_at > now() - make_interval(days => ${days})
    group by 1 order by 1`);
  return rows.map((r) => ({ day: r.day, builds: r.builds, passed: r.passed }));
}

export interface ProjectBuildRow {
  key: string;
  branch: string;
  commit: string;
  verdict: string | null;
  startedAt: Date;
  casesTotal: number;
  casesFailing: number;
}

export async function listProjectBuilds({
  workspaceId,
  projectId,
  limit,
  offset,
}: {
  workspaceId: string;
  projectId: string;
  limit: number;
  offset: number;
}): Promise<ProjectBuildRow[]> {
  const rows = await getDb().execute<{
    key: string;
    branch: string;
    commit: string;
    verdict: string | null;
    started_at: string;
    total: number;
    failing: number;
  }>(sql`
    select b.key, b.branch, b.commit, b.verdict, b.started_at, coalesce(c.total, 0)::int as total, coalesce(c.failing, 0)::int as failing
    from builds b
    left join lateral (
      select count(*) as total, count(*) filter (where l.verdict in ('fail', 'error')) as failing
      from (select distinct on (r.case_id) r.verdict from runs r where r.build_id = b.id order by r.case_id, r.created_at desc) l
    ) c on true
    where b.workspace_id = ${workspaceId} and b.project_id = ${projectId}
    order by b.started_at desc, b.id desc limit ${limit} offset ${offset}`);
  return rows.map((r) => ({
    key: r.key,
    branch: r.branch,
    commit: r.commit,
    verdict: r.verdict,
    startedAt: new Date(r.started_at),
    casesTotal: r.total,
    casesFailing: r.failing,
  }));
}

export interface CaseStateRow {
  caseName: string;
  verdict: string | null;
  lastRunId: string | null;
  lastBuildKey: string | null;
  lastAt: Date | null;
  /** The oldest build of the current streak: where the case took its present verdict. */
  sinceBuildKey: string | null;
  sinceAt: Date | null;
  /** False when every analysed run on the branch has had the present verdict. */
  changed: boolean;
}

/**
 * Every case of a project with its verdict on a branch (its latest analysed run there), and
 * since which build it has had that verdict — for a failing case, the build where it started to
 * fail.
 */
export async function listCaseStates({
  workspaceId,
  projectId,
  branch,
}: {
  workspaceId: string;
  projectId: string;
  branch: string;
}): Promise<CaseStateRow[]> {
  const rows = await getDb().execute<{
    case_name: string;
    verdict: string | null;
    last_run_id: string | null;
    last_build_key: string | null;
    last_at: string | null;
    since_build_key: string | null;
    since_at: string | null;
    changed: boolean | null;
  }>(sql`
    with ordered as (
      select r.case_id, r.id as run_id, r.verdict, b.key as build_key, b.started_at,
        row_number() over (partition by r.case_id order by b.started_at desc, r.created_at desc) as rn
      from runs r join builds b on b.id = r.build_id
      where r.workspace_id = ${workspaceId} and r.project_id = ${projectId} and b.branch = ${branch}
        and r.status in ('done', 'error')
    ),
    latest as (select * from ordered where rn = 1),
    first_other as (
      select o.case_id, min(o.rn) as rn from ordered o join latest l on l.case_id = o.case_id
      where o.verdict is distinct from l.verdict group by o.case_id
    ),
    oldest as (select case_id, max(rn) as rn from ordered group by case_id)
    select c.name as case_name, l.verdict, l.run_id as last_run_id, l.build_key as last_build_key, l.started_at as last_at,
      s.build_key as since_build_key, s.started_at as since_at, (fo.rn is not null) as changed
    from cases c
    left join latest l on l.case_id = c.id
    left join first_other fo on fo.case_id = c.id
    left join oldest od on od.case_id = c.id
    left join ordered s on s.case_id = c.id and s.rn = coalesce(fo.rn - 1, od.rn)
    where c.workspace_id = ${workspaceId} and c.project_id = ${projectId}
    order by case l.verdict when 'error' then 0 when 'fail' then 1 when 'warn' then 2 when 'pass' then 3 else 4 end, c.name`);
  return rows.map((r) => ({
    caseName: r.case_name,
    verdict: r.verdict,
    lastRunId: r.last_run_id,
    lastBuildKey: r.last_build_key,
    lastAt: r.last_at ? new Date(r.last_at) : null,
    sinceBuildKey: r.since_build_key,
    sinceAt: r.since_at ? new Date(r.since_at) : null,
    changed: Boolean(r.changed),
  }));
}
