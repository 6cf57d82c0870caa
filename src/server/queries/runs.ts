import 'server-only';
import { and, asc, desc, eq, inArray } from 'drizzle-orm';
import { getDb, type Executor } from '@/db/client';
import { worstFindingOrder } from './finding-order';
import {
  builds,
  cases,
  findings,
  projects,
  runs,
  uploads,
  variables,
  type Finding,
  type Run,
  type Upload,
  type Variable,
} from '@/db/schema';

export async function insertRun(
  input: {
    workspaceId: string;
    projectId: string;
    buildId: string;
    caseId: string;
    manifest: unknown;
    idempotencyKey?: string | null;
    requestHash?: string | null;
  },
  db: Executor = getDb(),
): Promise<Run> {
  const [row] = await db
    .insert(runs)
    .values({ ...input, idempotencyKey: input.idempotencyKey ?? null, requestHash: input.requestHash ?? null })
    .returning();
  return row!;
}

export async function insertUpload(
  input: {
    workspaceId: string;
    runId: string;
    objectKey: string;
    fileName: string;
    size: number;
    sha256: string;
    format?: string | null;
    contentType?: string | null;
  },
  db: Executor = getDb(),
): Promise<void> {
  await db.insert(uploads).values({ ...input, format: input.format ?? null, contentType: input.contentType ?? null });
}

export async function getRunByIdempotencyKey({
  projectId,
  key,
}: {
  projectId: string;
  key: string;
}): Promise<Run | undefined> {
  const rows = await getDb()
    .select()
    .from(runs)
    .where(and(eq(runs.projectId, projectId), eq(runs.idempotencyKey, key)))
    .limit(1);
  return rows[0];
}

export interface RunContext {
  run: Run;
  caseName: string;
  casePolicy: unknown;
  projectSlug: string;
  projectName: string;
  projectPolicy: unknown;
  defaultBranch: string;
  buildKey: string;
  branch: string;
  commit: string;
  ciUrl: string | null;
}

/** A run with the names and policies around it, scoped to a workspace. */
export async function getRunContext({
  workspaceId,
  id,
}: {
  workspaceId: string;
  id: string;
}): Promise<RunContext | undefined> {
  const rows = await getDb()
    .select({
      run: runs,
      caseName: cases.name,
      casePolicy: cases.policy,
      projectSlug: projects.slug,
      projectName: projects.name,
      projectPolicy: projects.defaultPolicy,
      defaultBranch: projects.defaultBranch,
      buildKey: builds.key,
      branch: builds.branch,
      commit: builds.commit,
      ciUrl: builds.ciUrl,
    })
    .from(runs)
    .innerJoin(cases, eq(cases.id, runs.caseId))
    .innerJoin(projects, eq(projects.id, runs.projectId))
    .innerJoin(builds, eq(builds.id, runs.buildId))
    .where(and(eq(runs.workspaceId, workspaceId), eq(runs.id, id)))
    .limit(1);
  return rows[0];
}

/**
 * Where a run belongs, without scoping: for the worker (which serves every workspace) and for
 * the access check that decides whether a caller may see the run at all.
 */
export async function getRunProject({
  id,
}: {
  id: string;
}): Promise<{ workspaceId: string; projectId: string } | undefined> {
  const rows = await getDb()
    .select({ workspaceId: runs.workspaceId, projectId: runs.projectId })
    .from(runs)
    .where(eq(runs.id, id))
    .limit(1);
  return rows[0];
}

/** For the worker, which serves every workspace: the workspace a run belongs to. */
export async function getRunWorkspace({ id }: { id: string }): Promise<string | undefined> {
  const rows = await getDb().select({ workspaceId: runs.workspaceId }).from(runs).where(eq(runs.id, id)).limit(1);
  return rows[0]?.workspaceId;
}

export async function getUploadForRun({
  workspaceId,
  runId,
}: {
  workspaceId: string;
  runId: string;
}): Promise<Upload | undefined> {
  const rows = await getDb()
    .select()
    .from(uploads)
    .where(and(eq(uploads.workspaceId, workspaceId), eq(uploads.runId, runId)))
    .orderBy(desc(uploads.createdAt))
    .limit(1);
  return rows[0];
}

export async function listRunVariables({
  workspaceId,
  runId,
}: {
  workspaceId: string;
  runId: string;
}): Promise<Variable[]> {
  return getDb()
    .select()
    .from(variables)
    .where(and(eq(variables.workspaceId, workspaceId), eq(variables.runId, runId)))
    .orderBy(asc(variables.name));
}

export async function listRunFindings({
  workspaceId,
  runId,
}: {
  workspaceId: string;
  runId: string;
}): Promise<Finding[]> {
  return getDb()
    .select()
    .from(findings)
    .where(and(eq(findings.workspaceId, workspaceId), eq(findings.runId, runId)))
    .orderBy(worstFindingOrder('findings'), asc(findings.variable));
}

export async function markRunAnalysing({ id }: { id: string }): Promise<void> {
  await getDb().update(runs).set({ status: 'analysing', startedAt: new Date() }).where(eq(runs.id, id));
}

export interface AnalysisResultRows {
  variables: Omit<typeof variables.$inferInsert, 'runId' | 'workspaceId'>[];
  findings: Omit<typeof findings.$inferInsert, 'runId' | 'workspaceId'>[];
  verdict: 'pass' | 'warn' | 'fail' | 'error';
  policy: unknown;
  errorMessage?: string | null;
}

/**
 * Replaces a run's results with new ones: earlier variables and findings go, so running the same
 * analysis twice leaves one copy (idempotent jobs, re-analysis with another policy).
 */
export async function replaceRunResults(
  { workspaceId, runId, result }: { workspaceId: string; runId: string; result: AnalysisResultRows },
  db: Executor,
): Promise<void> {
  await db.delete(findings).where(and(eq(findings.workspaceId, workspaceId), eq(findings.runId, runId)));
  await db.delete(variables).where(and(eq(variables.workspaceId, workspaceId), eq(variables.runId, runId)));
  if (result.variables.length > 0) {
    await db.insert(variables).values(result.variables.map((v) => ({ ...v, runId, workspaceId })));
  }
  if (result.findings.length > 0) {
    await db.insert(findings).values(result.findings.map((f) => ({ ...f, runId, workspaceId })));
  }
  await db
    .update(runs)
    .set({
      status: result.verdict === 'error' ? 'error' : 'done',
      verdict: result.verdict,
      errorMessage: result.errorMessage ?? null,
      policy: result.policy,
      finishedAt: new Date(),
    })
    .where(and(eq(runs.workspaceId, workspaceId), eq(runs.id, runId)));
}

/** Which of these object keys an upload row refers to (the worker's sweep, across workspaces). */
export async function listReferencedObjectKeysGlobal({ keys }: { keys: string[] }): Promise<Set<string>> {
  if (keys.length === 0) return new Set();
  const rows = await getDb().select({ key: uploads.objectKey }).from(uploads).where(inArray(uploads.objectKey, keys));
  return new Set(rows.map((r) => r.key));
}
