import 'server-only';
import { and, asc, desc, eq, inArray, sql } from 'drizzle-orm';
import { getDb, type Executor } from '@/db/client';
import { baselines, builds, cases, projects, runs, users } from '@/db/schema';

/** Queries behind the case page, the policy form, project settings and the manual upload form. */

export interface CaseRunRow {
  runId: string;
  status: string;
  verdict: string | null;
  errorMessage: string | null;
  createdAt: Date;
  finishedAt: Date | null;
  buildId: string;
  buildKey: string;
  branch: string;
  commit: string;
}

const caseRunColumns = {
  runId: runs.id,
  status: runs.status,
  verdict: runs.verdict,
  errorMessage: runs.errorMessage,
  createdAt: runs.createdAt,
  finishedAt: runs.finishedAt,
  buildId: builds.id,
  buildKey: builds.key,
  branch: builds.branch,
  commit: builds.commit,
};

/** The case's most recent runs, newest first, with their build. */
export async function listCaseRuns({
  workspaceId,
  caseId,
  limit,
}: {
  workspaceId: string;
  caseId: string;
  limit: number;
}): Promise<CaseRunRow[]> {
  return getDb()
    .select(caseRunColumns)
    .from(runs)
    .innerJoin(builds, eq(builds.id, runs.buildId))
    .where(and(eq(runs.workspaceId, workspaceId), eq(runs.caseId, caseId)))
    .orderBy(desc(runs.createdAt), desc(runs.id))
    .limit(limit);
}

/** The case's newest analysed run (status done): the one a policy change can be re-judged on. */
export async function getLatestAnalysedRun({
  workspaceId,
  caseId,
}: {
  workspaceId: string;
  caseId: string;
}): Promise<CaseRunRow | undefined> {
  const rows = await getDb()
    .select(caseRunColumns)
    .from(runs)
    .innerJoin(builds, eq(builds.id, runs.buildId))
    .where(and(eq(runs.workspaceId, workspaceId), eq(runs.caseId, caseId), eq(runs.status, 'done')))
    .orderBy(desc(runs.createdAt), desc(runs.id))
    .limit(1);
  return rows[0];
}

export interface CaseBaselineRow {
  branch: string;
  runId: string;
  acceptedAt: Date;
  acceptedByEmail: string | null;
  verdict: string | null;
  buildKey: string;
  commit: string;
}

/** The accepted baseline of each branch of a case, with the build it came from. */
export async function listCaseBaselines({
  workspaceId,
  caseId,
}: {
  workspaceId: string;
  caseId: string;
}): Promise<CaseBaselineRow[]> {
  return getDb()
    .select({
      branch: baselines.branch,
      runId: baselines.runId,
      acceptedAt: baselines.acceptedAt,
      acceptedByEmail: users.email,
      verdict: runs.verdict,
      buildKey: builds.key,
      commit: builds.commit,
    })
    .from(baselines)
    .innerJoin(runs, eq(runs.id, baselines.runId))
    .innerJoin(builds, eq(builds.id, runs.buildId))
    .leftJoin(users, eq(users.id, baselines.acceptedBy))
    .where(and(eq(baselines.workspaceId, workspaceId), eq(baselines.caseId, caseId)))
    .orderBy(asc(baselines.branch));
}

/** Replaces a case's partial policy. */
export async function updateCasePolicy(
  { workspaceId, caseId, policy }: { workspaceId: string; caseId: string; policy: unknown },
  db: Executor = getDb(),
): Promise<void> {
  await db
    .update(cases)
    .set({ policy })
    .where(and(eq(cases.workspaceId, workspaceId), eq(cases.id, caseId)));
}

/** Name, default branch and default (partial) policy of a project. */
export async function updateProjectSettings(
  {
    workspaceId,
    projectId,
    name,
    defaultBranch,
    defaultPolicy,
  }: { workspaceId: string; projectId: string; name: string; defaultBranch: string; defaultPolicy: unknown },
  db: Executor = getDb(),
): Promise<void> {
  await db
    .update(projects)
    .set({ name, defaultBranch, defaultPolicy })
    .where(and(eq(projects.workspaceId, workspaceId), eq(projects.id, projectId)));
}

/** Case names per project, for the upload form's suggestions. */
export async function listCaseNames({
  workspaceId,
  projectIds,
}: {
  workspaceId: string;
  projectIds: string[];
}): Promise<{ projectId: string; name: string }[]> {
  if (projectIds.length === 0) return [];
  return getDb()
    .select({ projectId: cases.projectId, name: cases.name })
    .from(cases)
    .where(and(eq(cases.workspaceId, workspaceId), inArray(cases.projectId, projectIds)))
    .orderBy(asc(cases.name))
    .limit(2000);
}

/** How many runs a case has in all (the history shows the newest only). */
export async function countCaseRuns({ workspaceId, caseId }: { workspaceId: string; caseId: string }): Promise<number> {
  const [row] = await getDb()
    .select({ n: sql<number>`count(*)::int` })
    .from(runs)
    .where(and(eq(runs.workspaceId, workspaceId), eq(runs.caseId, caseId)));
  return row?.n ?? 0;
}
