import 'server-only';
import type { Finding as FindingRow } from '@/db/schema';
import { judgedBounds } from '@/src/analysis/judge';
import { DEFAULT_POLICY, parsePolicy, resolveRules, type Policy, type VariableRules } from '@/src/analysis/policy';
import type { StepSeries, VariableSummary } from '@/src/analysis/summary';
import { metricsCsv, metricsJson, type MetricSeries } from '@/src/lib/metrics-export';
import type {
  BaselineView,
  ChartColumn,
  ChartSeriesView,
  FindingView,
  RunPageData,
  RunStatus,
  RunVerdict,
  VariableRulesView,
  VariableView,
} from '@/src/lib/run-views';
import { keepPositions, pickAt } from '@/src/lib/series-decimate';
import { boundTolerances, driftThresholds, tvBand, tvGrowthThresholds } from '@/src/lib/tolerance-band';
import { runIdSchema } from '@/src/schemas/runs';
import type { RunScope } from '../auth/scope';
import { AppError } from '../errors';
import {
  getBaselineRunRow,
  getRunPageRow,
  getVariableWithSeries,
  hasRun,
  listVariableNames,
  listVariableOutlines,
  type RunPageRow,
} from '../queries/run-page';
import { getUploadForRun, listRunFindings } from '../queries/runs';
import { presignGet } from '../storage';
import { CHECKS_DO_NOT_PROVE } from './reports';

/**
 * The run page: what its server component shows (header, findings, variables with their rules,
 * the baseline) and what its charts fetch (decimated metric series, downloads). Reads go through
 * queries scoped by the workspace, so a run of another workspace is simply not found.
 *
 * Long series: the chart route thins a 5,000-step series to about `points` steps on the server
 * (keepPositions: each bucket keeps every metric's smallest and largest value and steps with
 * findings are always kept); the browser never decimates.
 */

type StoredSummary = Omit<VariableSummary, 'series' | 'findings' | 'verdict'>;

/** The run's stored effective policy; an unreadable one (an older format) falls back to the defaults. */
function storedPolicy(policy: unknown): Policy {
  if (policy === null || policy === undefined) return DEFAULT_POLICY;
  try {
    return parsePolicy(policy);
  } catch {
    return DEFAULT_POLICY;
  }
}

function rulesFor(policy: Policy, summary: StoredSummary): VariableRules {
  return resolveRules(policy, {
    variable: summary.variable,
    dims: summary.shape.filter((size) => size > 1).length,
    options: summary.options ?? {},
  });
}

function rulesView(
  rules: VariableRules,
  summary: StoredSummary,
  first: { min: number; max: number },
): VariableRulesView {
  const lower = rules.bounds.lower ?? first.min;
  const upper = rules.bounds.upper ?? first.max;
  return {
    tv: { ...rules.tvGrowth },
    conservation: { ...rules.conservation },
    newExtrema: { ...rules.newExtrema },
    bounds: {
      check: rules.bounds.check,
      lower,
      upper,
      lowerSource: rules.bounds.lower !== undefined ? 'physical' : 'first-step',
      upperSource: rules.bounds.upper !== undefined ? 'physical' : 'first-step',
      tolerance: rules.bounds.tolerance,
      relativeTolerance: rules.bounds.relativeTolerance,
    },
  };
}

function numberList(x: unknown): number[] {
  return Array.isArray(x) ? x.map((v) => (typeof v === 'number' ? v : Number.NaN)) : [];
}

function timeList(x: unknown): (number | null)[] {
  return Array.isArray(x) ? x.map((v) => (typeof v === 'number' && Number.isFinite(v) ? v : null)) : [];
}

function findingView(f: FindingRow): FindingView {
  return {
    id: f.id,
    variable: f.variable,
    kind: f.kind,
    severity: f.severity,
    step: f.step,
    time: f.time,
    location: (f.location as FindingView['location']) ?? null,
    magnitude: f.magnitude,
    threshold: f.threshold,
    message: f.message,
  };
}

/**
 * The first step's range, read from the summary: its bounds are the first step's min and max on
 * every side without a declared physical bound, and a side with one is resolved from the rules
 * before this is used.
 */
function firstRange(summary: StoredSummary): { min: number; max: number } {
  return { min: summary.bounds.lower, max: summary.bounds.upper };
}

function variableView(
  policy: Policy,
  outline: { name: string; shape: number[]; precision: string; summary: unknown; steps: unknown; times: unknown },
): VariableView {
  const summary = outline.summary as StoredSummary;
  const rules = rulesFor(policy, summary);
  return {
    name: outline.name,
    shape: outline.shape,
    axes: (summary.axes ?? []).map((a) => ({ name: a.name, size: a.size, periodic: a.periodic })),
    dims: outline.shape.filter((size) => size > 1).length,
    precision: outline.precision,
    cells: summary.cells,
    tvReference: summary.tvReference,
    steps: numberList(outline.steps),
    times: timeList(outline.times),
    rules: rulesView(rules, summary, firstRange(summary)),
  };
}

/** The baseline of the run's case: on the run's branch, else on the project's default branch. */
export async function findRunBaseline(input: {
  workspaceId: string;
  runId: string;
  caseId: string;
  branch: string;
  defaultBranch: string;
}): Promise<BaselineView | null> {
  const { workspaceId, caseId } = input;
  let row = await getBaselineRunRow({ workspaceId, caseId, branch: input.branch });
  let fromDefaultBranch = false;
  if (!row && input.defaultBranch !== input.branch) {
    row = await getBaselineRunRow({ workspaceId, caseId, branch: input.defaultBranch });
    fromDefaultBranch = row !== undefined;
  }
  if (!row) return null;
  const names = await listVariableNames({ workspaceId, runId: row.runId });
  return {
    runId: row.runId,
    branch: row.branch,
    fromDefaultBranch,
    buildKey: row.buildKey,
    commit: row.commit,
    acceptedAt: row.acceptedAt.toISOString(),
    isThisRun: row.runId === input.runId,
    variables: names,
  };
}

function pageRun(row: RunPageRow): RunPageData['run'] {
  const r = row.run;
  return {
    id: r.id,
    status: r.status as RunStatus,
    verdict: (r.verdict as RunVerdict | null) ?? null,
    errorMessage: r.errorMessage,
    queuedAt: r.queuedAt.toISOString(),
    startedAt: r.startedAt?.toISOString() ?? null,
    finishedAt: r.finishedAt?.toISOString() ?? null,
  };
}

/**
 * Whether the run page may be shown at all: the id is a UUID and the workspace has that run. The
 * run's layout asks this before the page streams, so a missing or foreign run answers HTTP 404
 * (once the loading state has been sent the status is fixed at 200).
 */
export async function runPageExists({ workspaceId, runId }: { workspaceId: string; runId: string }): Promise<boolean> {
  if (!runIdSchema.safeParse(runId).success) return false;
  return hasRun({ workspaceId, id: runId });
}

/** Everything the run page shows except chart data; null when the workspace has no such run. */
export async function getRunPage({
  workspaceId,
  workspaceSlug,
  runId,
}: {
  workspaceId: string;
  workspaceSlug: string;
  runId: string;
}): Promise<RunPageData | null> {
  const row = await getRunPageRow({ workspaceId, id: runId });
  if (!row) return null;
  const [findings, outlines, baseline] = await Promise.all([
    listRunFindings({ workspaceId, runId }),
    listVariableOutlines({ workspaceId, runId }),
    findRunBaseline({ workspaceId, runId, caseId: row.caseId, branch: row.branch, defaultBranch: row.defaultBranch }),
  ]);
  const policy = storedPolicy(row.run.policy);
  return {
    workspace: workspaceSlug,
    run: pageRun(row),
    project: { slug: row.projectSlug, name: row.projectName },
    caseName: row.caseName,
    build: { key: row.buildKey, commit: row.commit, branch: row.branch, ciUrl: row.ciUrl },
    findings: findings.map(findingView),
    variables: outlines.map((o) => variableView(policy, o)),
    baseline,
    note: CHECKS_DO_NOT_PROVE,
  };
}

/** A variable of the run with its series, by name or the first; 404s name what exists. */
async function loadVariable(scope: RunScope, name: string | undefined) {
  const names = await listVariableNames({ workspaceId: scope.workspaceId, runId: scope.runId });
  if (names.length === 0)
    throw new AppError('not_found:series', 'This run has no analysed variables (yet): check its status.');
  const chosen = name ?? names[0]!;
  const row = names.includes(chosen)
    ? await getVariableWithSeries({ workspaceId: scope.workspaceId, runId: scope.runId, name: chosen })
    : undefined;
  if (!row) throw new AppError('not_found:variable', `No variable "${name}" in this run; it has: ${names.join(', ')}.`);
  return { names, name: row.name, summary: row.summary as StoredSummary, series: row.series as StepSeries };
}

/** Positions of the steps at which this variable has findings, so decimation keeps them. */
function findingPositions(findings: FindingRow[], variable: string, steps: readonly number[]): number[] {
  const at = new Map(steps.map((s, p) => [s, p]));
  const out: number[] = [];
  for (const f of findings) {
    if (f.variable !== variable || f.step === null) continue;
    const p = at.get(f.step);
    if (p !== undefined) out.push(p);
  }
  return out;
}

/** Every chart column over all steps, before decimation. */
function chartColumns(
  series: StepSeries,
  summary: StoredSummary,
  rules: VariableRules,
): Record<ChartColumn, readonly (number | null)[]> {
  const tv = tvGrowthThresholds(series, rules.tvGrowth, summary.tvReference);
  const band = tvBand(series.tv, tv.fail);
  const drift = driftThresholds(series.massNoise ?? [], summary.massScale, rules.conservation);
  return {
    tv: series.tv,
    tvChange: series.tvChange,
    tvFail: tv.fail,
    tvWarn: tv.warn,
    tvFloor: tv.floor,
    tvCeiling: band.upper,
    tvPrevious: band.lower,
    extrema: series.extrema,
    newExtrema: series.newExtrema,
    min: series.min,
    max: series.max,
    boundTolerance: boundTolerances(
      { min: series.min, max: series.max, valueFloor: series.valueFloor ?? [] },
      rules.bounds,
    ),
    violatingCells: series.violatingCells,
    massDrift: series.massDrift,
    massFail: drift.fail,
    massWarn: drift.warn,
  };
}

/** Columns whose spikes decimation must keep (the band columns follow the metrics they bound). */
const ENVELOPE_COLUMNS: ChartColumn[] = ['tv', 'tvChange', 'extrema', 'min', 'max', 'massDrift'];

/** One variable's metric series for the run page's charts, thinned to about `points` steps. */
export async function getChartSeries(
  scope: RunScope,
  variableName: string | undefined,
  points: number,
): Promise<ChartSeriesView> {
  const [variable, row, findings] = await Promise.all([
    loadVariable(scope, variableName),
    getRunPageRow({ workspaceId: scope.workspaceId, id: scope.runId }),
    listRunFindings({ workspaceId: scope.workspaceId, runId: scope.runId }),
  ]);
  const { series, summary } = variable;
  const rules = rulesFor(storedPolicy(row?.run.policy), summary);
  const all = chartColumns(series, summary, rules);
  const count = series.index.length;
  const positions = keepPositions(
    count,
    ENVELOPE_COLUMNS.map((c) => all[c]),
    points,
    findingPositions(findings, variable.name, series.index),
  );
  const columns = Object.fromEntries(Object.entries(all).map(([k, v]) => [k, pickAt(v, positions)])) as Record<
    ChartColumn,
    (number | null)[]
  >;
  const bounds = judgedBounds({ ...summary, series } as VariableSummary, rules);
  return {
    variable: variable.name,
    variables: variable.names,
    count,
    complete: positions.length === count,
    positions,
    step: positions.map((p) => series.index[p]!),
    time: pickAt(series.time, positions),
    columns,
    bounds,
  };
}

export interface MetricsExport {
  fileName: string;
  body: string;
  contentType: string;
}

/** The full per-step metrics (not decimated) of one variable or of all, as CSV or JSON. */
export async function getMetricsExport(
  scope: RunScope,
  variableName: string | undefined,
  format: 'csv' | 'json',
): Promise<MetricsExport> {
  const names = await listVariableNames({ workspaceId: scope.workspaceId, runId: scope.runId });
  if (names.length === 0)
    throw new AppError('not_found:series', 'This run has no analysed variables (yet): check its status.');
  if (variableName !== undefined && !names.includes(variableName)) {
    throw new AppError('not_found:variable', `No variable "${variableName}" in this run; it has: ${names.join(', ')}.`);
  }
  const chosen = variableName === undefined ? names : [variableName];
  const rows = await Promise.all(
    chosen.map((name) => getVariableWithSeries({ workspaceId: scope.workspaceId, runId: scope.runId, name })),
  );
  const list = rows.filter((r) => r !== undefined).map((r) => ({ name: r.name, series: r.series as MetricSeries }));
  const base = `run-${scope.runId.slice(0, 8)}${variableName ? `-${variableName.replace(/[^A-Za-z0-9._-]/g, '_')}` : ''}-metrics`;
  if (format === 'csv')
    return { fileName: `${base}.csv`, body: metricsCsv(list), contentType: 'text/csv; charset=utf-8' };
  const body = JSON.stringify({
    run: scope.runId,
    variables: list.map((v) => ({ name: v.name, series: metricsJson(v.series) })),
  });
  return { fileName: `${base}.json`, body, contentType: 'application/json; charset=utf-8' };
}

/** A short-lived URL of the run's raw upload in object storage. */
export async function getRunFileUrl(scope: RunScope): Promise<string> {
  const upload = await getUploadForRun({ workspaceId: scope.workspaceId, runId: scope.runId });
  if (!upload) throw new AppError('not_found:upload', 'This run has no stored file.');
  return presignGet({ key: upload.objectKey, fileName: upload.fileName });
}
