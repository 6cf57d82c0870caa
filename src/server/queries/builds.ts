import 'server-only';
import { and, eq, sql } from 'drizzle-orm';
import { getDb, type Executor } from '@/db/client';
import { builds, type Build } from '@/db/schema';

export async function getBuildByKey(
  { workspaceId, projectId, key }: { workspaceId: string; projectId: string; key: string },
  db: Executor = getDb(),
): Promise<Build | undefined> {
  const rows = await db
    .select()
    .from(builds)
    .where(and(eq(builds.workspaceId, workspaceId), eq(builds.projectId, projectId), eq(builds.key, key)))
    .limit(1);
  return rows[0];
}

/** The build with this CI key, created on first use. */
export async function ensureBuild(
  input: {
    workspaceId: string;
    projectId: string;
    key: string;
    commit: string;
    branch: string;
    ciUrl?: string | null;
    startedAt?: Date;
  },
  db: Executor = getDb(),
): Promise<Build> {
  await db
    .insert(builds)
    .values({ ...input, ciUrl: input.ciUrl ?? null, startedAt: input.startedAt ?? new Date() })
    .onConflictDoNothing({ target: [builds.projectId, builds.key] });
  return (await getBuildByKey(input, db))!;
}

/**
 * Takes the build's row lock for the rest of the transaction. Two runs of one build finishing at
 * the same moment would otherwise each count the other as still open; with the lock the second
 * refresh waits for the first transaction to commit, and then sees its run.
 */
async function lockBuild({ buildId }: { buildId: string }, db: Executor): Promise<void> {
  await db.execute(sql`select id from builds where id = ${buildId} for update`);
}

/**
 * Recomputes a build's verdict as the worst latest run of its cases (error > fail > warn > pass)
 * and marks it finished once none of them is queued or being analysed. Called in the same transaction that
 * finishes a run, so the build never shows a verdict its runs do not support.
 */
export async function refreshBuildVerdict({ buildId }: { buildId: string }, db: Executor = getDb()): Promise<void> {
  await lockBuild({ buildId }, db);
  await db.execute(sql`
    update builds b set
      verdict = agg.worst,
      finished_at = case when agg.open = 0 then coalesce(b.finished_at, now()) else null end
    from (
      select
        (array['pass','warn','fail','error']::verdict[])[max(case r.verdict
            when 'pass' then 1 when 'warn' then 2 when 'fail' then 3 when 'error' then 4 end)] as worst,
        count(*) filter (where r.status in ('queued', 'analysing')) as open
      -- The latest run of each case counts: a CI retry of a case supersedes the earlier one.
      from (select distinct on (case_id) verdict, status from runs where build_id = ${buildId}
            order by case_id, created_at desc) r
    ) agg
    where b.id = ${buildId}`);
}

/** A build that had finished is open again while a newly posted run is analysed. */
export async function reopenBuild({ buildId }: { buildId: string }, db: Executor = getDb()): Promise<void> {
  await db.update(builds).set({ finishedAt: null }).where(eq(builds.id, buildId));
}
