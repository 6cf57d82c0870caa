import 'server-only';
import { and, asc, eq } from 'drizzle-orm';
import { getDb, type Executor } from '@/db/client';
import { baselines, cases, projects, workspaces, type Case, type Project } from '@/db/schema';

export async function getProjectBySlug({
  workspaceId,
  slug,
}: {
  workspaceId: string;
  slug: string;
}): Promise<Project | undefined> {
  const rows = await getDb()
    .select()
    .from(projects)
    .where(and(eq(projects.workspaceId, workspaceId), eq(projects.slug, slug)))
    .limit(1);
  return rows[0];
}

export async function getProjectById({
  workspaceId,
  id,
}: {
  workspaceId: string;
  id: string;
}): Promise<Project | undefined> {
  const rows = await getDb()
    .select()
    .from(projects)
    .where(and(eq(projects.workspaceId, workspaceId), eq(projects.id, id)))
    .limit(1);
  return rows[0];
}

export async function listProjects({ workspaceId }: { workspaceId: string }): Promise<Project[]> {
  return getDb().select().from(projects).where(eq(projects.workspaceId, workspaceId)).orderBy(asc(projects.name));
}

/** Finds or creates a workspace by slug (seeding and set-up scripts). */
export async function ensureWorkspace({ slug, name }: { slug: string; name: string }): Promise<{ id: string }> {
  await getDb().insert(workspaces).values({ slug, name }).onConflictDoNothing({ target: workspaces.slug });
  const [row] = await getDb().select({ id: workspaces.id }).from(workspaces).where(eq(workspaces.slug, slug));
  return row!;
}

export async function ensureProject(input: {
  workspaceId: string;
  slug: string;
  name: string;
  defaultBranch?: string;
  defaultPolicy?: unknown;
}): Promise<Project> {
  await getDb()
    .insert(projects)
    .values({ ...input, defaultPolicy: input.defaultPolicy ?? {} })
    .onConflictDoNothing({ target: [projects.workspaceId, projects.slug] });
  return (await getProjectBySlug({ workspaceId: input.workspaceId, slug: input.slug }))!;
}

/** The case of a project with this name, created on first use (CI names new cases freely). */
export async function ensureCase(
  { workspaceId, projectId, name }: { workspaceId: string; projectId: string; name: string },
  db: Executor = getDb(),
): Promise<Case> {
  await db
    .insert(cases)
    .values({ workspaceId, projectId, name })
    .onConflictDoNothing({ target: [cases.projectId, cases.name] });
  const [row] = await db
    .select()
    .from(cases)
    .where(and(eq(cases.workspaceId, workspaceId), eq(cases.projectId, projectId), eq(cases.name, name)));
  return row!;
}

export async function getCaseByName({
  workspaceId,
  projectId,
  name,
}: {
  workspaceId: string;
  projectId: string;
  name: string;
}): Promise<Case | undefined> {
  const rows = await getDb()
    .select()
    .from(cases)
    .where(and(eq(cases.workspaceId, workspaceId), eq(cases.projectId, projectId), eq(cases.name, name)))
    .limit(1);
  return rows[0];
}

export async function setCasePolicy({
  workspaceId,
  id,
  policy,
}: {
  workspaceId: string;
  id: string;
  policy: unknown;
}): Promise<void> {
  await getDb()
    .update(cases)
    .set({ policy })
    .where(and(eq(cases.workspaceId, workspaceId), eq(cases.id, id)));
}

/** The accepted run of a case on a branch, if any. */
export async function getBaseline({
  workspaceId,
  caseId,
  branch,
}: {
  workspaceId: string;
  caseId: string;
  branch: string;
}): Promise<{ runId: string; acceptedAt: Date } | undefined> {
  const rows = await getDb()
    .select({ runId: baselines.runId, acceptedAt: baselines.acceptedAt })
    .from(baselines)
    .where(and(eq(baselines.workspaceId, workspaceId), eq(baselines.caseId, caseId), eq(baselines.branch, branch)))
    .limit(1);
  return rows[0];
}

export async function upsertBaseline(
  input: {
    workspaceId: string;
    caseId: string;
    branch: string;
    runId: string;
    acceptedBy?: string | null;
    acceptedByToken?: string | null;
  },
  db: Executor = getDb(),
): Promise<void> {
  const values = {
    ...input,
    acceptedBy: input.acceptedBy ?? null,
    acceptedByToken: input.acceptedByToken ?? null,
    acceptedAt: new Date(),
  };
  await db
    .insert(baselines)
    .values(values)
    .onConflictDoUpdate({
      target: [baselines.caseId, baselines.branch],
      set: {
        runId: values.runId,
        acceptedBy: values.acceptedBy,
        acceptedByToken: values.acceptedByToken,
        acceptedAt: values.acceptedAt,
      },
    });
}
