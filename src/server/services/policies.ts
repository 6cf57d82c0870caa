import 'server-only';
import { notFound } from 'next/navigation';
import { transaction } from '@/db/client';
import type { Case, Project } from '@/db/schema';
import type { Policy, SummaryMetrics, Verdict } from '@/src/analysis';
import { validatePolicyForm, type PolicyFormValues } from '@/src/schemas/policy-form';
import type { MemberContext } from '../auth/session';
import { roleAtLeast } from '../auth/roles';
import { AppError } from '../errors';
import { insertAuditEvent } from '../queries/audit';
import { refreshBuildVerdict } from '../queries/builds';
import {
  countCaseRuns,
  getLatestAnalysedRun,
  listCaseBaselines,
  listCaseNames,
  listCaseRuns,
  updateCasePolicy,
  updateProjectSettings,
  type CaseBaselineRow,
  type CaseRunRow,
} from '../queries/cases';
import { listWorstFindings } from '../queries/digests';
import { getCaseByName, getProjectBySlug, listProjects } from '../queries/projects';
import { getRunContext, listRunVariables, replaceRunResults, type AnalysisResultRows } from '../queries/runs';
import { fromVariableRow, judgeToRows, loadBaselineSummaries } from './analysis';
import { acceptBaseline } from './baselines';

/**
 * Policies, baselines and manual uploads as the web app sees them: what the case page, the
 * project settings page, the baseline panel and the upload page show, and the writes behind
 * their forms. Every function takes the member context the page or action got from
 * requireMember / authorizeMember, so each query is scoped by the workspace in the URL; writes
 * check the maintainer role again here, whatever the caller checked.
 *
 * Re-judging never re-reads the snapshot file: the stored summaries hold everything `judge`
 * needs, so a policy change takes effect on the latest run in one transaction.
 */

export const CASE_HISTORY_SIZE = 30;

function assertMaintainer(ctx: MemberContext): void {
  if (!roleAtLeast(ctx.role, 'maintainer')) {
    throw new AppError(
      'forbidden:role',
      `Changing policies and baselines needs the maintainer role; you are ${ctx.role}.`,
    );
  }
}

function invalidPolicy(fieldErrors: Record<string, string[]>): AppError {
  const count = Object.keys(fieldErrors).length;
  return new AppError(
    'invalid:policy',
    `The policy has ${count === 1 ? 'a problem' : `${count} problems`}; see the marked fields.`,
    { fieldErrors },
  );
}

async function findProject(ctx: MemberContext, slug: string): Promise<Project> {
  const project = await getProjectBySlug({ workspaceId: ctx.workspace.id, slug });
  if (!project) throw new AppError('not_found:project', `No project "${slug}" in this workspace.`);
  return project;
}

async function findProjectAndCase(
  ctx: MemberContext,
  projectSlug: string,
  caseName: string,
): Promise<{ project: Project; kase: Case }> {
  const project = await findProject(ctx, projectSlug);
  const kase = await getCaseByName({ workspaceId: ctx.workspace.id, projectId: project.id, name: caseName });
  if (!kase) throw new AppError('not_found:case', `No case "${caseName}" in project "${projectSlug}".`);
  return { project, kase };
}

/** Page loaders answer a missing project or case with the 404 page. */
async function pageLookup<T>(load: () => Promise<T>): Promise<T> {
  try {
    return await load();
  } catch (err) {
    if (err instanceof AppError && err.kind === 'not_found') notFound();
    throw err;
  }
}

// ---------------------------------------------------------------------------------------------
// Case page

export interface CaseHistoryRow extends CaseRunRow {
  worstFinding: string | null;
}

export async function getCasePage(ctx: MemberContext, projectSlug: string, caseName: string) {
  const { project, kase } = await pageLookup(() => findProjectAndCase(ctx, projectSlug, caseName));
  const workspaceId = ctx.workspace.id;
  const [runs, total, baselines, latest] = await Promise.all([
    listCaseRuns({ workspaceId, caseId: kase.id, limit: CASE_HISTORY_SIZE }),
    countCaseRuns({ workspaceId, caseId: kase.id }),
    listCaseBaselines({ workspaceId, caseId: kase.id }),
    getLatestAnalysedRun({ workspaceId, caseId: kase.id }),
  ]);
  const worst = await listWorstFindings({ workspaceId, runIds: runs.map((r) => r.runId) });
  const history: CaseHistoryRow[] = runs.map((r) => ({ ...r, worstFinding: worst[r.runId] ?? null }));
  return {
    project: {
      slug: project.slug,
      name: project.name,
      defaultBranch: project.defaultBranch,
      defaultPolicy: project.defaultPolicy,
    },
    kase: { id: kase.id, name: kase.name, policy: kase.policy },
    history,
    totalRuns: total,
    baselines,
    latest: latest ?? null,
    canEdit: roleAtLeast(ctx.role, 'maintainer'),
  };
}

// ---------------------------------------------------------------------------------------------
// Re-judging from stored summaries

interface Rejudged {
  rows: AnalysisResultRows;
  baselineRunId: string | null;
}

/** Judges a run's stored summaries with `policy` and the case's baseline; writes nothing. */
async function judgeStoredRun(
  workspaceId: string,
  project: Project,
  kase: Case,
  run: CaseRunRow,
  policy: Policy,
): Promise<Rejudged> {
  const stored = await listRunVariables({ workspaceId, runId: run.runId });
  if (stored.length === 0)
    throw new AppError('conflict:run', 'The latest run has no stored analysis to re-judge; analyse it again first.');
  const baseline = await loadBaselineSummaries({
    workspaceId,
    caseId: kase.id,
    runId: run.runId,
    branch: run.branch,
    defaultBranch: project.defaultBranch,
  });
  return {
    rows: judgeToRows(stored.map(fromVariableRow), policy, baseline?.summaries ?? null),
    baselineRunId: baseline?.runId ?? null,
  };
}

export interface PreviewFinding {
  severity: 'warn' | 'fail';
  variable: string;
  kind: string;
  message: string;
}

export interface PolicyPreview {
  run: { id: string; buildKey: string; branch: string; verdict: string | null };
  /** The verdict the run would get with the candidate policy. */
  verdict: Verdict;
  findings: PreviewFinding[];
  baselineRunId: string | null;
}

function previewOf(run: CaseRunRow, judged: Rejudged): PolicyPreview {
  return {
    run: { id: run.runId, buildKey: run.buildKey, branch: run.branch, verdict: run.verdict },
    verdict: judged.rows.verdict as Verdict,
    findings: judged.rows.findings.map((f) => ({
      severity: f.severity,
      variable: f.variable,
      kind: f.kind,
      message: f.message,
    })),
    baselineRunId: judged.baselineRunId,
  };
}

/** Validates a case's candidate policy over its project's default and returns both layers. */
function checkCasePolicy(
  project: Project,
  values: PolicyFormValues,
): { partial: Record<string, unknown>; effective: Policy } {
  const result = validatePolicyForm(values, project.defaultPolicy);
  if (!result.ok) throw invalidPolicy(result.fieldErrors);
  return { partial: result.partial, effective: result.effective };
}

/**
 * What the case's latest analysed run would be judged with the candidate policy, before anything
 * is saved. Null when the case has no analysed run yet. Writes nothing.
 */
export async function previewCasePolicy(
  ctx: MemberContext,
  input: { projectSlug: string; caseName: string; values: PolicyFormValues },
): Promise<PolicyPreview | null> {
  assertMaintainer(ctx);
  const { project, kase } = await findProjectAndCase(ctx, input.projectSlug, input.caseName);
  const { effective } = checkCasePolicy(project, input.values);
  const latest = await getLatestAnalysedRun({ workspaceId: ctx.workspace.id, caseId: kase.id });
  if (!latest) return null;
  return previewOf(latest, await judgeStoredRun(ctx.workspace.id, project, kase, latest, effective));
}

export interface SavedCasePolicy {
  policy: Record<string, unknown>;
  rejudged: { runId: string; before: string | null; after: Verdict } | null;
}

/**
 * Stores a case's policy (only what is set at case level) and, when asked, re-judges the latest
 * analysed run with it: the policy, the run's findings and verdict, its build's verdict and the
 * audit event change in one transaction.
 */
export async function saveCasePolicy(
  ctx: MemberContext,
  input: { projectSlug: string; caseName: string; values: PolicyFormValues; rejudge: boolean },
): Promise<SavedCasePolicy> {
  assertMaintainer(ctx);
  const workspaceId = ctx.workspace.id;
  const { project, kase } = await findProjectAndCase(ctx, input.projectSlug, input.caseName);
  const { partial, effective } = checkCasePolicy(project, input.values);
  const latest = input.rejudge ? await getLatestAnalysedRun({ workspaceId, caseId: kase.id }) : undefined;
  const judged = latest ? await judgeStoredRun(workspaceId, project, kase, latest, effective) : null;
  const rejudged =
    latest && judged ? { runId: latest.runId, before: latest.verdict, after: judged.rows.verdict as Verdict } : null;
  await transaction(async (tx) => {
    await updateCasePolicy({ workspaceId, caseId: kase.id, policy: partial }, tx);
    if (latest && judged) {
      await replaceRunResults({ workspaceId, runId: latest.runId, result: judged.rows }, tx);
      await refreshBuildVerdict({ buildId: latest.buildId }, tx);
    }
    await insertAuditEvent(
      {
        workspaceId,
        actorUserId: ctx.user.id,
        action: 'case.policy.update',
        targetType: 'case',
        targetId: kase.id,
        details: { project: project.slug, case: kase.name, before: kase.policy, after: partial, rejudged },
      },
      tx,
    );
  });
  return { policy: partial, rejudged };
}

// ---------------------------------------------------------------------------------------------
// Project settings

export async function getProjectSettingsPage(ctx: MemberContext, projectSlug: string) {
  const project = await pageLookup(() => findProject(ctx, projectSlug));
  return {
    project: {
      slug: project.slug,
      name: project.name,
      defaultBranch: project.defaultBranch,
      defaultPolicy: project.defaultPolicy,
    },
  };
}

/**
 * Renames a project, sets its default branch and its default policy (validated on its own: it
 * sits on the built-in defaults). Cases keep their own settings on top. Audited.
 */
export async function saveProjectSettings(
  ctx: MemberContext,
  input: { projectSlug: string; name: string; defaultBranch: string; values: PolicyFormValues },
): Promise<{ defaultPolicy: Record<string, unknown> }> {
  assertMaintainer(ctx);
  const project = await findProject(ctx, input.projectSlug);
  const result = validatePolicyForm(input.values, {});
  if (!result.ok) throw invalidPolicy(result.fieldErrors);
  await transaction(async (tx) => {
    await updateProjectSettings(
      {
        workspaceId: ctx.workspace.id,
        projectId: project.id,
        name: input.name,
        defaultBranch: input.defaultBranch,
        defaultPolicy: result.partial,
      },
      tx,
    );
    await insertAuditEvent(
      {
        workspaceId: ctx.workspace.id,
        actorUserId: ctx.user.id,
        action: 'project.settings.update',
        targetType: 'project',
        targetId: project.id,
        details: {
          project: project.slug,
          before: { name: project.name, defaultBranch: project.defaultBranch, defaultPolicy: project.defaultPolicy },
          after: { name: input.name, defaultBranch: input.defaultBranch, defaultPolicy: result.partial },
        },
      },
      tx,
    );
  });
  return { defaultPolicy: result.partial };
}

// ---------------------------------------------------------------------------------------------
// Baselines

export interface RunKeyMetrics {
  runId: string;
  buildKey: string;
  branch: string;
  commit: string;
  status: string;
  verdict: string | null;
  variables: { variable: string; metrics: SummaryMetrics }[];
}

export interface BaselineComparison {
  caseName: string;
  branch: string;
  run: RunKeyMetrics;
  /** The baseline runs on `branch` are compared with today (on the default branch when the branch has none). */
  current: (RunKeyMetrics & { acceptedAt: Date; acceptedByEmail: string | null; branch: string }) | null;
  /** True when `current` is the default branch's baseline, because `branch` has none of its own. */
  currentFromDefaultBranch: boolean;
  isCurrent: boolean;
}

async function keyMetricsOf(
  workspaceId: string,
  run: { runId: string; buildKey: string; branch: string; commit: string; status: string; verdict: string | null },
): Promise<RunKeyMetrics> {
  const rows = await listRunVariables({ workspaceId, runId: run.runId });
  return {
    ...run,
    variables: rows.map((v) => ({ variable: v.name, metrics: (v.summary as { metrics: SummaryMetrics }).metrics })),
  };
}

function pickBaseline(
  rows: CaseBaselineRow[],
  branch: string,
  defaultBranch: string,
): { row: CaseBaselineRow; fromDefault: boolean } | null {
  const own = rows.find((b) => b.branch === branch);
  if (own) return { row: own, fromDefault: false };
  const fallback = rows.find((b) => b.branch === defaultBranch);
  return fallback ? { row: fallback, fromDefault: true } : null;
}

/** A run's key metrics beside those of the baseline it would replace. Null when the run is not of this case. */
export async function getBaselineComparison(
  ctx: MemberContext,
  input: { projectSlug: string; caseName: string; runId: string; branch: string },
): Promise<BaselineComparison | null> {
  const workspaceId = ctx.workspace.id;
  const project = await getProjectBySlug({ workspaceId, slug: input.projectSlug });
  const kase = project ? await getCaseByName({ workspaceId, projectId: project.id, name: input.caseName }) : undefined;
  const run = await getRunContext({ workspaceId, id: input.runId });
  if (!project || !kase || !run || run.run.caseId !== kase.id) return null;
  const picked = pickBaseline(
    await listCaseBaselines({ workspaceId, caseId: kase.id }),
    input.branch,
    project.defaultBranch,
  );
  const [runMetrics, currentMetrics] = await Promise.all([
    keyMetricsOf(workspaceId, {
      runId: run.run.id,
      buildKey: run.buildKey,
      branch: run.branch,
      commit: run.commit,
      status: run.run.status,
      verdict: run.run.verdict,
    }),
    picked ? keyMetricsOf(workspaceId, { ...picked.row, status: 'done' }) : Promise.resolve(null),
  ]);
  return {
    caseName: kase.name,
    branch: input.branch,
    run: runMetrics,
    current:
      picked && currentMetrics
        ? {
            ...currentMetrics,
            branch: picked.row.branch,
            acceptedAt: picked.row.acceptedAt,
            acceptedByEmail: picked.row.acceptedByEmail,
          }
        : null,
    currentFromDefaultBranch: picked?.fromDefault ?? false,
    isCurrent: picked !== null && !picked.fromDefault && picked.row.runId === run.run.id,
  };
}

/** Accepts a run as its case's baseline on a branch, for a signed-in maintainer (audited by acceptBaseline). */
export async function acceptBaselineAsMember(
  ctx: MemberContext,
  input: { projectSlug: string; caseName: string; runId: string; branch: string },
) {
  assertMaintainer(ctx);
  const project = await findProject(ctx, input.projectSlug);
  return acceptBaseline({
    actor: { workspaceId: ctx.workspace.id, userId: ctx.user.id },
    projectId: project.id,
    caseName: input.caseName,
    runId: input.runId,
    branch: input.branch,
  });
}

// ---------------------------------------------------------------------------------------------
// Manual upload

export interface UploadTarget {
  slug: string;
  name: string;
  defaultBranch: string;
  cases: string[];
}

/** The projects a maintainer can upload to, with their cases (for suggestions). */
export async function getUploadTargets(ctx: MemberContext): Promise<UploadTarget[]> {
  const projects = await listProjects({ workspaceId: ctx.workspace.id });
  const names = await listCaseNames({ workspaceId: ctx.workspace.id, projectIds: projects.map((p) => p.id) });
  return projects.map((p) => ({
    slug: p.slug,
    name: p.name,
    defaultBranch: p.defaultBranch,
    cases: names.filter((c) => c.projectId === p.id).map((c) => c.name),
  }));
}
