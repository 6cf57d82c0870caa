import 'server-only';
import { eq, sql } from 'drizzle-orm';
import { getDb } from '@/db/client';
import { builds, projects, workspaces } from '@/db/schema';

export interface AlertBuildContext {
  workspaceId: string;
  workspaceSlug: string;
  workspaceName: string;
  projectId: string;
  projectSlug: string;
  projectName: string;
  defaultBranch: string;
  buildId: string;
  buildKey: string;
  commit: string;
  branch: string;
  ciUrl: string | null;
  /** Runs of the build still queued or being analysed. */
  openRuns: number;
}

/** Worker-side (any workspace): a build with its project and how many of its runs are still open. */
export async function getGlobalAlertBuild({ buildId }: { buildId: string }): Promise<AlertBuildContext | undefined> {
  const rows = await getDb()
    .select({
      workspaceId: builds.workspaceId,
      workspaceSlug: workspaces.slug,
      workspaceName: workspaces.name,
      projectId: builds.projectId,
      projectSlug: projects.slug,
      projectName: projects.name,
      defaultBranch: projects.defaultBranch,
      buildId: builds.id,
      buildKey: builds.key,
      commit: builds.commit,
      branch: builds.branch,
      ciUrl: builds.ciUrl,
      openRuns: sql<number>`(select count(*)::int from runs r where r.build_id = ${builds.id} and r.status in ('queued', 'analysing'))`,
    })
    .from(builds)
    .innerJoin(projects, eq(projects.id, builds.projectId))
    .innerJoin(workspaces, eq(workspaces.id, builds.workspaceId))
    .where(eq(builds.id, buildId))
    .limit(1);
  const row = rows[0];
  return row ? { ...row, openRuns: Number(row.openRuns) } : undefined;
}

export interface NewlyFailingRun {
  caseId: string;
  caseName: string;
  runId: string;
  /** The last judged run before this build, when it passed or warned; null for a case's first judged run. */
  previousRunId: string | null;
  previousBuildKey: string | null;
}

/**
 * The cases of a build whose latest run there failed while their previous judged run on the same
 * branch (pass, warn or fail, in an earlier-started build; `error` runs skipped) passed or warned,
 * or does not exist. A case whose previous judged run also failed is continuing a streak and is
 * not listed.
 */
export async function listNewlyFailingRuns({
  workspaceId,
  buildId,
}: {
  workspaceId: string;
  buildId: string;
}): Promise<NewlyFailingRun[]> {
  const rows = await getDb().execute<{
    case_id: string;
    case_name: string;
    run_id: string;
    prev_run_id: string | null;
    prev_build_key: string | null;
  }>(sql`
    with latest as (
      select distinct on (r.case_id) r.id as run_id, r.case_id, r.verdict
      from runs r
      where r.workspace_id = ${workspaceId} and r.build_id = ${buildId}
      order by r.case_id, r.created_at desc
    )
    select l.case_id, c.name as case_name, l.run_id, prev.run_id as prev_run_id, prev.build_key as prev_build_key
    from latest l
    join builds b on b.id = ${buildId} and b.workspace_id = ${workspaceId}
    join cases c on c.id = l.case_id
    left join lateral (
      select r2.id as run_id, r2.verdict, b2.key as build_key
      from runs r2 join builds b2 on b2.id = r2.build_id
      where r2.workspace_id = ${workspaceId} and r2.case_id = l.case_id and b2.branch = b.branch
        and r2.verdict in ('pass', 'warn', 'fail')
        and (b2.started_at, b2.id) < (b.started_at, b.id)
      order by b2.started_at desc, b2.id desc, r2.created_at desc
      limit 1
    ) prev on true
    where l.verdict = 'fail' and (prev.run_id is null or prev.verdict in ('pass', 'warn'))
    order by c.name`);
  return rows.map((r) => ({
    caseId: r.case_id,
    caseName: r.case_name,
    runId: r.run_id,
    previousRunId: r.prev_run_id,
    previousBuildKey: r.prev_build_key,
  }));
}
