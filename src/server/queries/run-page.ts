import 'server-only';
import { and, asc, eq, sql } from 'drizzle-orm';
import { getDb } from '@/db/client';
import { baselines, builds, runs, variables } from '@/db/schema';
import { getRunContext, type RunContext } from './runs';

/**
 * Reads for the run page and its chart routes. Every function takes the workspace to scope by:
 * a run id of another workspace finds nothing, exactly like an id that does not exist.
 */

/** A run with its case, project and build (the run context, with the case id at hand). */
export type RunPageRow = RunContext & { caseId: string };

/** A run with its case, project and build, scoped to a workspace. */
export async function getRunPageRow({
  workspaceId,
  id,
}: {
  workspaceId: string;
  id: string;
}): Promise<RunPageRow | undefined> {
  const ctx = await getRunContext({ workspaceId, id });
  return ctx ? { ...ctx, caseId: ctx.run.caseId } : undefined;
}

export interface VariableOutline {
  name: string;
  shape: number[];
  precision: string;
  summary: unknown;
  /** series.index and series.time only: the step list, not the metrics. */
  steps: unknown;
  times: unknown;
}

/**
 * The analysed variables of a run with their summaries and step lists, without the metric series
 * (which can be megabytes for 5,000 steps and are fetched per chart).
 */
export async function listVariableOutlines({
  workspaceId,
  runId,
}: {
  workspaceId: string;
  runId: string;
}): Promise<VariableOutline[]> {
  return getDb()
    .select({
      name: variables.name,
      shape: variables.shape,
      precision: variables.precision,
      summary: variables.summary,
      steps: sql<unknown>`${variables.series} -> 'index'`,
      times: sql<unknown>`${variables.series} -> 'time'`,
    })
    .from(variables)
    .where(and(eq(variables.workspaceId, workspaceId), eq(variables.runId, runId)))
    .orderBy(asc(variables.name));
}

/** Names of a run's analysed variables, in order. */
export async function listVariableNames({
  workspaceId,
  runId,
}: {
  workspaceId: string;
  runId: string;
}): Promise<string[]> {
  const rows = await getDb()
    .select({ name: variables.name })
    .from(variables)
    .where(and(eq(variables.workspaceId, workspaceId), eq(variables.runId, runId)))
    .orderBy(asc(variables.name));
  return rows.map((r) => r.name);
}

/** One analysed variable with its summary and full series. */
export async function getVariableWithSeries({
  workspaceId,
  runId,
  name,
}: {
  workspaceId: string;
  runId: string;
  name: string;
}): Promise<{ name: string; shape: number[]; summary: unknown; series: unknown } | undefined> {
  const rows = await getDb()
    .select({ name: variables.name, shape: variables.shape, summary: variables.summary, series: variables.series })
    .from(variables)
    .where(and(eq(variables.workspaceId, workspaceId), eq(variables.runId, runId), eq(variables.name, name)))
    .limit(1);
  return rows[0];
}

/**
 * What reading one step of a variable needs from its analysis: the axes (effective periodic
 * flags) and, per step, the step number, the value floor and the new-extrema count. Selected as
 * JSON paths so a step request does not parse every metric of every step.
 */
export async function getVariableStepFacts({
  workspaceId,
  runId,
  name,
}: {
  workspaceId: string;
  runId: string;
  name: string;
}): Promise<{ axes: unknown; steps: unknown; valueFloor: unknown; newExtrema: unknown } | undefined> {
  const rows = await getDb()
    .select({
      axes: sql<unknown>`${variables.summary} -> 'axes'`,
      steps: sql<unknown>`${variables.series} -> 'index'`,
      valueFloor: sql<unknown>`${variables.series} -> 'valueFloor'`,
      newExtrema: sql<unknown>`${variables.series} -> 'newExtrema'`,
    })
    .from(variables)
    .where(and(eq(variables.workspaceId, workspaceId), eq(variables.runId, runId), eq(variables.name, name)))
    .limit(1);
  return rows[0];
}

export interface BaselineRunRow {
  runId: string;
  branch: string;
  acceptedAt: Date;
  buildKey: string;
  commit: string;
}

/** The accepted baseline run of a case on one branch, with the build it came from. */
export async function getBaselineRunRow({
  workspaceId,
  caseId,
  branch,
}: {
  workspaceId: string;
  caseId: string;
  branch: string;
}): Promise<BaselineRunRow | undefined> {
  const rows = await getDb()
    .select({
      runId: baselines.runId,
      branch: baselines.branch,
      acceptedAt: baselines.acceptedAt,
      buildKey: builds.key,
      commit: builds.commit,
    })
    .from(baselines)
    .innerJoin(runs, and(eq(runs.id, baselines.runId), eq(runs.workspaceId, workspaceId)))
    .innerJoin(builds, eq(builds.id, runs.buildId))
    .where(and(eq(baselines.workspaceId, workspaceId), eq(baselines.caseId, caseId), eq(baselines.branch, branch)))
    .limit(1);
  return rows[0];
}

/** Whether the workspace has a run with this id (a cheap check before anything streams). */
export async function hasRun({ workspaceId, id }: { workspaceId: string; id: string }): Promise<boolean> {
  const rows = await getDb()
    .select({ id: runs.id })
    .from(runs)
    .where(and(eq(runs.workspaceId, workspaceId), eq(runs.id, id)))
    .limit(1);
  return rows.length > 0;
}
