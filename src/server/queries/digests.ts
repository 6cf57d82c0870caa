import 'server-only';
import { and, asc, desc, eq, gte, inArray, lt, sql } from 'drizzle-orm';
import { getDb } from '@/db/client';
import { builds, findings } from '@/db/schema';
import type { CaseRunRow, CaseStateRow, OpenStreakRow, Verdict } from '@/src/lib/digest-summary';

/**
 * What the weekly digest reads. "Case run" = the latest run of a case in a build (a CI retry
 * supersedes the earlier attempt), on builds of the given branch. Timestamps cross the raw SQL
 * boundary as epoch milliseconds (float8) so no driver-specific date parsing is involved.
 */

interface Scope {
  workspaceId: string;
  projectId: string;
  branch: string;
}

const ts = (d: Date) => sql`${d.toISOString()}::timestamptz`;
const epochMs = (column: string) => sql.raw(`(extract(epoch from ${column}) * 1000)::float8`);

/** Case runs with a verdict on builds of `branch` that started in [from, to), in build order. */
export async function listDigestCaseRuns({
  workspaceId,
  projectId,
  branch,
  from,
  to,
}: Scope & { from: Date; to: Date }): Promise<CaseRunRow[]> {
  const rows = await getDb().execute<{
    case_id: string;
    case_name: string;
    build_id: string;
    build_key: string;
    started_ms: number;
    run_id: string;
    verdict: Verdict;
  }>(sql`
    select * from (
      select distinct on (b.id, r.case_id)
        r.case_id, c.name as case_name, b.id as build_id, b.key as build_key,
        ${epochMs('b.started_at')} as started_ms, r.id as run_id, r.verdict
      from runs r
      join builds b on b.id = r.build_id
      join cases c on c.id = r.case_id
      where r.workspace_id = ${workspaceId} and b.workspace_id = ${workspaceId}
        and r.project_id = ${projectId} and b.branch = ${branch}
        and b.started_at >= ${ts(from)} and b.started_at < ${ts(to)}
        and r.verdict is not null
      order by b.id, r.case_id, r.created_at desc
    ) x
    order by started_ms, build_id, case_name`);
  return rows.map((r) => ({
    caseId: r.case_id,
    caseName: r.case_name,
    buildId: r.build_id,
    buildKey: r.build_key,
    buildStartedAt: new Date(Number(r.started_ms)),
    runId: r.run_id,
    verdict: r.verdict,
  }));
}

/** Each case's last judged verdict (pass, warn or fail; `error` skipped) on builds started before `before`. */
export async function listCaseStatesBefore({
  workspaceId,
  projectId,
  branch,
  before,
}: Scope & { before: Date }): Promise<CaseStateRow[]> {
  const rows = await getDb().execute<{ case_id: string; verdict: 'pass' | 'warn' | 'fail' }>(sql`
    with latest as (
      select distinct on (b.id, r.case_id) r.case_id, r.verdict, b.started_at, b.id as build_id
      from runs r join builds b on b.id = r.build_id
      where r.workspace_id = ${workspaceId} and r.project_id = ${projectId} and b.branch = ${branch}
        and b.started_at < ${ts(before)} and r.verdict is not null
      order by b.id, r.case_id, r.created_at desc
    )
    select distinct on (case_id) case_id, verdict from latest
    where verdict <> 'error'
    order by case_id, started_at desc, build_id desc`);
  return rows.map((r) => ({ caseId: r.case_id, verdict: r.verdict }));
}

/**
 * Cases whose last judged run before `at` failed, with the first failing build of their current
 * streak (the first fail after their last pass or warn, or after nothing) and its length in builds.
 */
export async function listOpenFailingStreaks({
  workspaceId,
  projectId,
  branch,
  at,
}: Scope & { at: Date }): Promise<OpenStreakRow[]> {
  const rows = await getDb().execute<{
    case_id: string;
    case_name: string;
    build_key: string;
    started_ms: number;
    run_id: string;
    failing_builds: number;
  }>(sql`
    with latest as (
      select distinct on (b.id, r.case_id) r.case_id, r.id as run_id, r.verdict, b.id as build_id, b.key as build_key, b.started_at
      from runs r join builds b on b.id = r.build_id
      where r.workspace_id = ${workspaceId} and r.project_id = ${projectId} and b.branch = ${branch}
        and b.started_at < ${ts(at)} and r.verdict is not null
      order by b.id, r.case_id, r.created_at desc
    ),
    judged as (select * from latest where verdict <> 'error'),
    last_ok as (select case_id, max(started_at) as at from judged where verdict in ('pass', 'warn') group by case_id),
    last_any as (select distinct on (case_id) case_id, verdict from judged order by case_id, started_at desc, build_id desc),
    streak as (
      select j.* from judged j left join last_ok o on o.case_id = j.case_id
      where j.verdict = 'fail' and (o.at is null or j.started_at > o.at)
    )
    select distinct on (s.case_id)
      s.case_id, c.name as case_name, s.build_key, ${epochMs('s.started_at')} as started_ms, s.run_id,
      (count(*) over (partition by s.case_id))::int as failing_builds
    from streak s
    join last_any la on la.case_id = s.case_id and la.verdict = 'fail'
    join cases c on c.id = s.case_id
    order by s.case_id, s.started_at asc, s.build_id asc`);
  return rows.map((r) => ({
    caseId: r.case_id,
    caseName: r.case_name,
    sinceBuildKey: r.build_key,
    sinceStartedAt: new Date(Number(r.started_ms)),
    sinceRunId: r.run_id,
    failingBuilds: Number(r.failing_builds),
  }));
}

export interface DigestBuildRow {
  key: string;
  branch: string;
  verdict: Verdict | null;
  startedAt: Date;
}

/** Builds of a project (every branch) that started in [from, to), newest first. */
export async function listProjectBuildsBetween({
  workspaceId,
  projectId,
  from,
  to,
}: {
  workspaceId: string;
  projectId: string;
  from: Date;
  to: Date;
}): Promise<DigestBuildRow[]> {
  return getDb()
    .select({ key: builds.key, branch: builds.branch, verdict: builds.verdict, startedAt: builds.startedAt })
    .from(builds)
    .where(
      and(
        eq(builds.workspaceId, workspaceId),
        eq(builds.projectId, projectId),
        gte(builds.startedAt, from),
        lt(builds.startedAt, to),
      ),
    )
    .orderBy(desc(builds.startedAt), asc(builds.key));
}

/**
 * The worst finding of each run, as its message: fail before warn, then the largest ratio of
 * magnitude to threshold, then the earliest step.
 */
export async function listWorstFindings({
  workspaceId,
  runIds,
}: {
  workspaceId: string;
  runIds: string[];
}): Promise<Record<string, string>> {
  if (runIds.length === 0) return {};
  const rows = await getDb()
    .selectDistinctOn([findings.runId], { runId: findings.runId, message: findings.message })
    .from(findings)
    .where(and(eq(findings.workspaceId, workspaceId), inArray(findings.runId, runIds)))
    .orderBy(
      findings.runId,
      desc(findings.severity),
      sql`case when ${findings.threshold} > 0 and ${findings.magnitude} is not null then abs(${findings.magnitude}) / ${findings.threshold} end desc nulls last`,
      sql`${findings.step} asc nulls last`,
    );
  return Object.fromEntries(rows.map((r) => [r.runId, r.message]));
}
