import 'server-only';
import type { FieldArray } from '@/src/analysis/types';
import type { SnapshotReader } from '@/src/ingest';
import { decimateKeepingExtrema, downsample2d } from '@/src/lib/decimate';
import { lineExtrema, unmatchedExtrema } from '@/src/lib/extrema-marks';
import { growthStats, planeOf, variationGrowth } from '@/src/lib/local-variation';
import type { GrowthView, StepView } from '@/src/lib/run-views';
import type { RunScope } from '../auth/scope';
import { AppError } from '../errors';
import { getRunPageRow, getVariableStepFacts } from '../queries/run-page';
import { getUploadForRun } from '../queries/runs';
import { readErrorToAppError, withStoredSnapshots } from './snapshots';

/**
 * Field values of one step for the run page's field chart and growth heat map, re-read from the
 * stored upload (the database keeps metrics, not fields) and reduced on the server: a 1D profile
 * decimated keeping its extrema (optionally within a cell window, for zooming to a finding at
 * full resolution), a 2D plane block-averaged, a 3D variable cut at one plane of its slowest axis.
 */

export interface StepRequest {
  variable?: string;
  points: number;
  /** 3D: index along the slowest axis; the middle plane when absent. */
  slice?: number;
  /** 1D: first and last cell of the window to decimate (inclusive). */
  from?: number;
  to?: number;
}

/** Extrema that moved by at most this many cells between stored steps are not marked as new. */
const NEW_EXTREMUM_REACH = 3;
/** At most this many new-extremum marks are sent (beyond that the chart is a thicket anyway). */
const MAX_MARKS = 2000;

interface StepFacts {
  periodic: boolean[];
  /** Position of the step in the stored series, its value floor and new-extrema count. */
  floorAt: (step: number) => number;
  gainedExtremaAt: (step: number) => number | null;
}

interface Located {
  reader: SnapshotReader;
  name: string;
  shape: number[];
  axisNames: string[];
  facts: StepFacts;
}

function asNumbers(x: unknown): number[] {
  return Array.isArray(x) ? x.map((v) => (typeof v === 'number' ? v : Number.NaN)) : [];
}

/**
 * Per-step facts from the stored analysis (the effective periodic flags, value floors); a run that
 * was never analysed falls back to the file's own periodic flags and a zero floor.
 */
async function stepFacts(scope: RunScope, reader: SnapshotReader, name: string): Promise<StepFacts> {
  const stored = await getVariableStepFacts({ workspaceId: scope.workspaceId, runId: scope.runId, name });
  const options = reader.header.variables.find((v) => v.name === name)?.options;
  const fileFlags = reader.header.grid.axes.map((a) => options?.periodic?.[a.name] ?? a.periodic);
  const axes = Array.isArray(stored?.axes) ? (stored.axes as { periodic?: unknown }[]) : [];
  const periodic = fileFlags.map((flag, k) =>
    typeof axes[k]?.periodic === 'boolean' ? (axes[k].periodic as boolean) : flag,
  );
  const steps = asNumbers(stored?.steps);
  const floors = asNumbers(stored?.valueFloor);
  const gained = asNumbers(stored?.newExtrema);
  const position = new Map(steps.map((s, p) => [s, p]));
  return {
    periodic,
    floorAt: (step) => {
      const f = floors[position.get(step) ?? -1];
      return f !== undefined && Number.isFinite(f) ? f : 0;
    },
    gainedExtremaAt: (step) => {
      const g = gained[position.get(step) ?? -1];
      return g !== undefined && Number.isFinite(g) ? g : null;
    },
  };
}

/** Opens the run's upload, resolves the variable, and hands the reader on; read errors become 4xx. */
async function withVariable<T>(
  scope: RunScope,
  variableName: string | undefined,
  fn: (at: Located) => Promise<T>,
): Promise<T> {
  const row = await getRunPageRow({ workspaceId: scope.workspaceId, id: scope.runId });
  if (!row) throw new AppError('not_found:run', `No run ${scope.runId} here.`);
  const upload = await getUploadForRun({ workspaceId: scope.workspaceId, runId: scope.runId });
  if (!upload) throw new AppError('not_found:upload', 'This run has no stored file.');
  try {
    return await withStoredSnapshots(upload, row.run.manifest, async (reader) => {
      const names = reader.header.variables.map((v) => v.name);
      const name = variableName ?? names[0];
      if (!name || !names.includes(name)) {
        throw new AppError(
          'not_found:variable',
          `No variable "${variableName}" in this file; it has: ${names.join(', ')}.`,
        );
      }
      const axes = reader.header.grid.axes;
      return fn({
        reader,
        name,
        shape: axes.map((a) => a.size),
        axisNames: axes.map((a) => a.name),
        facts: await stepFacts(scope, reader, name),
      });
    });
  } catch (err) {
    throw readErrorToAppError(err);
  }
}

interface StepPair {
  index: number;
  time: number;
  values: FieldArray;
  previous: { index: number; values: FieldArray } | null;
}

/** Streams to the step numbered `stepIndex`, keeping the step before it (readers allocate a fresh array per step). */
async function readStepPair(at: Located, stepIndex: number): Promise<StepPair> {
  let previous: StepPair['previous'] = null;
  for await (const step of at.reader.steps) {
    if (step.index > stepIndex) break;
    const values = step.fields[at.name]!;
    if (step.index === stepIndex) return { index: step.index, time: step.time, values, previous };
    previous = { index: step.index, values };
  }
  throw new AppError('not_found:step', `No step ${stepIndex} in this run.`);
}

function jsonValues(values: ArrayLike<number>): (number | null)[] {
  return Array.from(values, (v) => (Number.isFinite(v) ? v : null));
}

/** The plane index of a 3D variable: the requested one (checked) or the middle of the slowest axis. */
function resolveSlice(
  shape: number[],
  axisNames: string[],
  slice: number | undefined,
): { axis: string; index: number; count: number } | undefined {
  if (shape.length < 3) {
    if (slice !== undefined)
      throw new AppError(
        'invalid:slice',
        `slice is for 3D variables; this one has ${shape.length} ${shape.length === 1 ? 'axis' : 'axes'}.`,
      );
    return undefined;
  }
  const count = shape[0]!;
  const index = slice ?? Math.floor(count / 2);
  if (index >= count)
    throw new AppError('invalid:slice', `slice ${index} is outside 0-${count - 1} (axis ${axisNames[0]}).`);
  return { axis: axisNames[0]!, index, count };
}

/** The cell window [from, to] of a 1D line, checked; the whole line when neither is given. */
function resolveWindow(
  size: number,
  from: number | undefined,
  to: number | undefined,
): { from: number; to: number } | undefined {
  if (from === undefined && to === undefined) return undefined;
  const first = from ?? 0;
  const last = Math.min(to ?? size - 1, size - 1);
  if (first > last)
    throw new AppError(
      'invalid:window',
      `from (${first}) must not exceed to (${last}); the line has cells 0-${size - 1}.`,
    );
  return { from: first, to: last };
}

/** Extrema of the step with no same-kind extremum nearby at the previous step, inside the window. */
function newExtremaMarks(at: Located, pair: StepPair, window: { from: number; to: number }): number[] {
  if (!pair.previous) return [];
  const gained = at.facts.gainedExtremaAt(pair.index);
  if (gained === 0) return [];
  const periodic = at.facts.periodic[0] ?? false;
  const floor = at.facts.floorAt(pair.index);
  const n = pair.values.length;
  const now = lineExtrema(pair.values, floor, periodic);
  const before = lineExtrema(pair.previous.values, at.facts.floorAt(pair.previous.index), periodic);
  return unmatchedExtrema(now, before, NEW_EXTREMUM_REACH, n, periodic)
    .map((m) => m.cell)
    .filter((cell) => cell >= window.from && cell <= window.to)
    .slice(0, MAX_MARKS);
}

function reduceLine(at: Located, pair: StepPair, request: StepRequest): StepView {
  const n = pair.values.length;
  const window = resolveWindow(n, request.from, request.to);
  const span = window ?? { from: 0, to: n - 1 };
  const part = pair.values.subarray(span.from, span.to + 1);
  const d = decimateKeepingExtrema(part, request.points);
  return {
    variable: at.name,
    step: pair.index,
    time: Number.isFinite(pair.time) ? pair.time : null,
    shape: at.shape,
    index: d.index.map((i) => i + span.from),
    values: jsonValues(d.values),
    complete: d.complete && window === undefined,
    ...(window ? { window } : {}),
    newExtrema: newExtremaMarks(at, pair, span),
  };
}

function reducePlane(at: Located, pair: StepPair, request: StepRequest): StepView {
  const slice = resolveSlice(at.shape, at.axisNames, request.slice);
  const plane = planeOf(pair.values, at.shape, slice?.index ?? 0);
  const side = Math.max(4, Math.floor(Math.sqrt(request.points)));
  const ds = downsample2d(plane.values, plane.rows, plane.cols, side, side);
  return {
    variable: at.name,
    step: pair.index,
    time: Number.isFinite(pair.time) ? pair.time : null,
    shape: at.shape,
    rows: ds.rows,
    cols: ds.cols,
    values: jsonValues(ds.values),
    complete: ds.rows === plane.rows && ds.cols === plane.cols,
    ...(slice ? { slice } : {}),
  };
}

/**
 * One stored step of a variable reduced for a chart. The answer keeps the shape of the original
 * steps route (variable, step, time, shape, index/values or rows/cols/values, complete) and adds
 * `slice`, `window` and `newExtrema` where they apply.
 */
export async function getStepView(scope: RunScope, stepIndex: number, request: StepRequest): Promise<StepView> {
  return withVariable(scope, request.variable, async (at) => {
    if (at.shape.length > 1 && (request.from !== undefined || request.to !== undefined)) {
      throw new AppError(
        'invalid:window',
        'from/to select cells of a 1D variable; 2D and 3D steps are block-averaged whole.',
      );
    }
    if (at.shape.length === 1 && request.slice !== undefined) resolveSlice(at.shape, at.axisNames, request.slice);
    const pair = await readStepPair(at, stepIndex);
    return at.shape.length === 1 ? reduceLine(at, pair, request) : reducePlane(at, pair, request);
  });
}

/**
 * Where local variation grew between a step and the step stored before it: the per-cell growth
 * lv_n(c) - lv_{n-1}(c) over the whole field (src/lib/local-variation.ts), then the plane to show
 * (3D: one slice) block-averaged to at most `points` cells.
 */
export async function getGrowthView(
  scope: RunScope,
  stepIndex: number,
  request: Omit<StepRequest, 'from' | 'to'>,
): Promise<GrowthView> {
  return withVariable(scope, request.variable, async (at) => {
    const slice = resolveSlice(at.shape, at.axisNames, request.slice);
    const pair = await readStepPair(at, stepIndex);
    if (!pair.previous)
      throw new AppError(
        'invalid:step',
        `Step ${stepIndex} is the first stored step; growth compares a step with the one before it.`,
      );
    const growth = variationGrowth(pair.values, pair.previous.values, at.shape, at.facts.periodic);
    const plane = planeOf(growth, at.shape, slice?.index ?? 0);
    const stats = growthStats(plane.values);
    const side = Math.max(4, Math.floor(Math.sqrt(request.points)));
    const ds = downsample2d(plane.values, plane.rows, plane.cols, side, side);
    return {
      variable: at.name,
      step: pair.index,
      previousStep: pair.previous.index,
      shape: at.shape,
      rows: ds.rows,
      cols: ds.cols,
      values: jsonValues(ds.values),
      total: stats.total,
      peak: stats.peak,
      complete: ds.rows === plane.rows && ds.cols === plane.cols,
      ...(slice ? { slice } : {}),
    };
  });
}
