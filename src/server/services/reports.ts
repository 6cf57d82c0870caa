import 'server-only';
import type { Finding, Variable } from '@/db/schema';
import type { ProjectScope, RunScope } from '../auth/scope';
import { env } from '../env';
import { AppError } from '../errors';
import { listBuildCases } from '../queries/build-view';
import { getBuildByKey } from '../queries/builds';
import { decimateKeepingExtrema, downsample2d } from '@/src/lib/decimate';
import { getRunContext, getUploadForRun, listRunFindings, listRunVariables, type RunContext } from '../queries/runs';
import { readErrorToAppError, withStoredSnapshots } from './snapshots';

/** What GET /api/v1/runs/:id answers, and what CI scripts print. */
export interface RunReport {
  run: {
    id: string;
    url: string;
    status: string;
    verdict: string | null;
    errorMessage: string | null;
    project: string;
    case: string;
    build: { key: string; commit: string; branch: string };
    queuedAt: string;
    startedAt: string | null;
    finishedAt: string | null;
  };
  findings: ReturnType<typeof findingView>[];
  variables: { name: string; shape: number[]; precision: string; summary: unknown }[];
  note: string;
}

/** Said wherever a verdict is shown: what a pass does not mean. */
export const CHECKS_DO_NOT_PROVE =
  'These checks look for spurious oscillation, bound violations and drift in the snapshots. A pass does not validate the physics, the accuracy or the convergence of the solver.';

export function findingView(f: Finding) {
  return {
    variable: f.variable,
    kind: f.kind,
    severity: f.severity,
    step: f.step,
    time: f.time,
    location: f.location,
    magnitude: f.magnitude,
    threshold: f.threshold,
    message: f.message,
  };
}

/** The run of an already-resolved scope with its names and policies. */
export async function loadRun(scope: RunScope): Promise<RunContext> {
  const ctx = await getRunContext({ workspaceId: scope.workspaceId, id: scope.runId });
  if (!ctx) throw new AppError('not_found:run', `No run ${scope.runId} here.`);
  return ctx;
}

export async function getRunReport(scope: RunScope): Promise<RunReport> {
  const ctx = await loadRun(scope);
  const [findings, variables] = await Promise.all([
    listRunFindings({ workspaceId: scope.workspaceId, runId: scope.runId }),
    listRunVariables({ workspaceId: scope.workspaceId, runId: scope.runId }),
  ]);
  const r = ctx.run;
  return {
    run: {
      id: r.id,
      url: `${env().APP_URL}/api/v1/runs/${r.id}`,
      status: r.status,
      verdict: r.verdict,
      errorMessage: r.errorMessage,
      project: ctx.projectSlug,
      case: ctx.caseName,
      build: { key: ctx.buildKey, commit: ctx.commit, branch: ctx.branch },
      queuedAt: r.queuedAt.toISOString(),
      startedAt: r.startedAt?.toISOString() ?? null,
      finishedAt: r.finishedAt?.toISOString() ?? null,
    },
    findings: findings.map(findingView),
    variables: variables.map((v: Variable) => ({
      name: v.name,
      shape: v.shape,
      precision: v.precision,
      summary: v.summary,
    })),
    note: CHECKS_DO_NOT_PROVE,
  };
}

/** The per-step series of one variable (the first one when none is named). */
export async function getRunSeries(
  scope: RunScope,
  variableName?: string,
): Promise<{ variable: string; series: unknown; variables: string[] }> {
  const variables = await listRunVariables({ workspaceId: scope.workspaceId, runId: scope.runId });
  if (variables.length === 0)
    throw new AppError('not_found:series', 'This run has no analysed variables (yet): check its status.');
  const chosen = variableName ? variables.find((v) => v.name === variableName) : variables[0];
  if (!chosen) {
    throw new AppError(
      'not_found:variable',
      `No variable "${variableName}" in this run; it has: ${variables.map((v) => v.name).join(', ')}.`,
    );
  }
  return { variable: chosen.name, series: chosen.series, variables: variables.map((v) => v.name) };
}

export async function getBuildReport(scope: ProjectScope, key: string) {
  const build = await getBuildByKey({ workspaceId: scope.workspaceId, projectId: scope.projectId, key });
  if (!build) throw new AppError('not_found:build', `No build "${key}" in project "${scope.projectSlug}".`);
  // Latest run of each case with its worst finding, in one query; in case-name order for CI tables.
  const runs = (await listBuildCases({ workspaceId: scope.workspaceId, buildId: build.id })).sort((x, y) =>
    x.caseName.localeCompare(y.caseName),
  );
  const open = runs.some((r) => r.status === 'queued' || r.status === 'analysing');
  return {
    build: {
      key: build.key,
      project: scope.projectSlug,
      commit: build.commit,
      branch: build.branch,
      ciUrl: build.ciUrl,
      verdict: open ? null : build.verdict,
      finished: !open,
      startedAt: build.startedAt.toISOString(),
      finishedAt: build.finishedAt?.toISOString() ?? null,
    },
    runs: runs.map((r) => ({
      id: r.runId,
      case: r.caseName,
      status: r.status,
      verdict: r.verdict,
      errorMessage: r.errorMessage,
      worstFinding: r.worstFinding,
      url: `${env().APP_URL}/api/v1/runs/${r.runId}`,
    })),
    note: CHECKS_DO_NOT_PROVE,
  };
}

export interface StepValues {
  variable: string;
  step: number;
  time: number | null;
  shape: number[];
  /** 1D: kept cell indices and their values. 2D/3D: a block-averaged grid of `rows` x `cols`. */
  index?: number[];
  values: number[];
  rows?: number;
  cols?: number;
  complete: boolean;
}

/**
 * One stored step of a variable, re-read from the upload (the database keeps metrics, not
 * fields) and reduced for a chart: 1D decimated keeping local extrema, 2D block-averaged to at
 * most `points` cells, 3D the middle slice of the slowest axis.
 */
export async function getRunStep(
  scope: RunScope,
  stepIndex: number,
  variableName: string | undefined,
  points: number,
): Promise<StepValues> {
  const ctx = await loadRun(scope);
  const upload = await getUploadForRun({ workspaceId: scope.workspaceId, runId: scope.runId });
  if (!upload) throw new AppError('not_found:upload', 'This run has no stored file.');
  try {
    return await withStoredSnapshots(upload, ctx.run.manifest, async (reader) => {
      const names = reader.header.variables.map((v) => v.name);
      const name = variableName ?? names[0];
      if (!name || !names.includes(name)) {
        throw new AppError(
          'not_found:variable',
          `No variable "${variableName}" in this file; it has: ${names.join(', ')}.`,
        );
      }
      const shape = reader.header.grid.axes.map((a) => a.size);
      for await (const step of reader.steps) {
        if (step.index > stepIndex) break;
        if (step.index !== stepIndex) continue;
        return reduceStep(name, step.index, step.time, shape, step.fields[name]!, points);
      }
      throw new AppError('not_found:step', `No step ${stepIndex} in this run.`);
    });
  } catch (err) {
    throw readErrorToAppError(err);
  }
}

function jsonNumber(v: number): number | null {
  return Number.isFinite(v) ? v : null;
}

function reduceStep(
  variable: string,
  step: number,
  time: number,
  shape: number[],
  values: ArrayLike<number>,
  points: number,
): StepValues {
  const t = Number.isFinite(time) ? time : null;
  if (shape.length === 1) {
    const d = decimateKeepingExtrema(values, points);
    return {
      variable,
      step,
      time: t,
      shape,
      index: d.index,
      values: d.values.map((v) => jsonNumber(v) as number),
      complete: d.complete,
    };
  }
  const nx = shape[shape.length - 1]!;
  const ny = shape[shape.length - 2]!;
  // 3D: the middle slice along the slowest axis (a slice selector can ask for others later).
  const offset = shape.length === 3 ? Math.floor(shape[0]! / 2) * nx * ny : 0;
  const plane = Array.prototype.slice.call(values, offset, offset + nx * ny) as number[];
  const side = Math.max(4, Math.floor(Math.sqrt(points)));
  const ds = downsample2d(plane, ny, nx, side, side);
  return {
    variable,
    step,
    time: t,
    shape,
    rows: ds.rows,
    cols: ds.cols,
    values: ds.values.map((v) => jsonNumber(v) as number),
    complete: ds.rows === ny && ds.cols === nx,
  };
}
