/**
 * The streaming analyser: feed it the steps of one variable in order, get a plain-object summary.
 * Memory is O(cells of one step) plus the per-step series: the previous step's values in a
 * preallocated Float64Array (for the local-variation increase) and, on 2D/3D grids, the
 * union-find buffers of the extremum count. Each step costs one sweep over the cells (kernels.ts),
 * plus on the first step a sweep for max |phi| (the scale of the noise floor), a repeat sweep on
 * any step whose max |phi| exceeds every earlier step's (the floor must use the current
 * magnitude), and a repair sweep on steps holding NaN or infinities.
 */
import { judge } from './judge';
import {
  createNdBuffers,
  createStats,
  pass1d,
  passNd,
  type NdBuffers,
  type PassLimits,
  type StepStats,
} from './kernels';
import {
  axisCentre,
  cellSizes,
  gridLayout,
  totalCellSize,
  unravelIndex,
  type CellSizes,
  type GridLayout,
} from './grid';
import { frontSide, increase1d, increaseMarginals, maxSumWindow, type SumWindow } from './localise';
import { isBinary, massNoise, tvNoise, unitRoundoff, valueFloor } from './noise-floor';
import { DEFAULT_POLICY, parsePolicy, type Policy, type PolicyInput } from './policy';
import {
  SUMMARY_VERSION,
  type CellRange,
  type GrowthLocation,
  type NonFiniteSummary,
  type StepSeries,
  type SummaryMetrics,
  type VariableSummary,
} from './summary';
import type { FieldArray, Step, VariableInfo } from './types';

export interface AnalyserOptions {
  /** Policy for the findings attached to the summary (default policy when omitted). */
  policy?: Policy | PolicyInput;
}

export interface Analyser {
  readonly variable: string;
  /**
   * Analyses the next step. `significantDigits` (decimal text only) is the largest number of
   * significant digits the reader saw in this step; it narrows the noise floor.
   * Throws RangeError when the step's length differs from the grid's cell count or its index
   * does not increase, and Error after `finish`.
   */
  push(step: Step, significantDigits?: number): void;
  /** The summary of every step pushed so far, judged with the analyser's policy. */
  finish(): VariableSummary;
}

/**
 * Creates a streaming analyser for one variable. Per step it records: total variation (sum over
 * axes, wrap-around on periodic axes, Neumaier-compensated), its change absolute and relative to
 * the first step's TV, strict local extrema (noise floor, plateaus once) and new extrema, min and
 * max, overshoot/undershoot and violating cells against the physical bounds of the options or the
 * first step's range, mass sum(phi * cell size) and its drift, non-finite values, the noise floors
 * of each comparison, the smooth-profile sampling allowance, and for steps where TV grew beyond
 * its noise floor the window of largest local-variation increase with, given a velocity sign, the
 * side of the front it lies on. Formulas: docs/metrics.md and the modules named there.
 *
 * References: Harten 1983, "High resolution schemes for hyperbolic conservation laws"; Neumaier
 * 1974, "Rundungsfehleranalyse einiger Verfahren zur Summation endlicher Summen"; Higham 2002,
 * "Accuracy and Stability of Numerical Algorithms"; Goodman & LeVeque 1985, "On the accuracy of
 * stable schemes for 2D scalar conservation laws".
 */
export function createAnalyser(variable: VariableInfo, options: AnalyserOptions = {}): Analyser {
  return new VariableAnalyser(variable, options);
}

function emptySeries(): StepSeries {
  return {
    index: [],
    time: [],
    tv: [],
    tvChange: [],
    tvChangeRelative: [],
    tvNoise: [],
    samplingAllowance: [],
    extrema: [],
    newExtrema: [],
    min: [],
    max: [],
    argMin: [],
    argMax: [],
    argMinCoordinates: [],
    argMaxCoordinates: [],
    overshoot: [],
    undershoot: [],
    violatingCells: [],
    magnitude: [],
    unitRoundoff: [],
    valueFloor: [],
    mass: [],
    massDrift: [],
    massNoise: [],
    nonFinite: [],
  };
}

class VariableAnalyser implements Analyser {
  readonly variable: string;
  private readonly info: VariableInfo;
  private readonly policy: Policy;
  private readonly layout: GridLayout;
  private readonly sizes: CellSizes;
  private readonly totalSize: number;
  /** Widths for the 1D fast path (null when cells are uniform). */
  private readonly widths1d: Float64Array | null;
  private readonly uniformSize: number;
  private readonly fast1d: boolean;
  private readonly prev: Float64Array;
  private readonly nd: NdBuffers | null;
  private readonly stats: StepStats = createStats();
  private readonly limits: PassLimits = { floor: 0, upperLimit: Infinity, lowerLimit: -Infinity };
  private readonly series: StepSeries = emptySeries();
  private readonly growth: GrowthLocation[] = [];
  private scratch: Float64Array | null = null;
  /** Growth-window buffers, allocated on the first step whose TV grew. */
  private increase: Float64Array | null = null;
  private marginals: Float64Array[] | null = null;
  private magnitude = 0;
  private lowerBound = -Infinity;
  private upperBound = Infinity;
  private nonFinite: NonFiniteSummary | null = null;
  private samplingGap = { upper: 0, lower: 0 };
  /** The first step's sum |phi| * cell size: the divisor of the mass drift. */
  private firstL1 = 0;
  private finished = false;

  constructor(info: VariableInfo, options: AnalyserOptions) {
    this.info = info;
    this.variable = info.name;
    this.policy = options.policy === undefined ? DEFAULT_POLICY : parsePolicy(options.policy);
    if (info.grid.axes.length < 1 || info.grid.axes.length > 3) {
      throw new RangeError(`variable "${info.name}": grids have 1 to 3 axes`);
    }
    unitRoundoff(info.precision); // validates the precision once, up front
    this.layout = gridLayout(info.grid, info.options);
    this.sizes = cellSizes(info.grid, info.options);
    this.totalSize = totalCellSize(this.sizes, this.layout.shape);
    const n = this.layout.cells;
    this.fast1d = this.layout.shape.length === 1 && n >= 2;
    this.uniformSize = 'uniform' in this.sizes ? this.sizes.uniform : 1;
    this.widths1d = this.fast1d && 'widths' in this.sizes ? this.sizes.widths[0]! : null;
    this.prev = new Float64Array(n);
    this.nd = this.fast1d ? null : createNdBuffers(this.layout.shape, n);
    const b = info.options?.bounds;
    if (b?.lower !== undefined) this.lowerBound = b.lower;
    if (b?.upper !== undefined) this.upperBound = b.upper;
  }

  push(step: Step, significantDigits?: number): void {
    if (this.finished) throw new Error(`analyser of "${this.variable}" is finished`);
    const n = this.layout.cells;
    if (step.values.length !== n) {
      throw new RangeError(
        `variable "${this.variable}", step ${step.index}: ${step.values.length} values for ${n} cells`,
      );
    }
    const last = this.series.index[this.series.index.length - 1];
    if (last !== undefined && !(step.index > last)) {
      throw new RangeError(`variable "${this.variable}": step ${step.index} does not follow step ${last}`);
    }
    const u = unitRoundoff(this.info.precision, significantDigits);
    const position = this.series.index.length;
    if (position === 0) this.magnitude = maxAbsFinite(step.values);
    let data: FieldArray = step.values;
    this.run(data, u);
    let bad = 0;
    if (!allFinite(this.stats)) {
      bad = countNonFinite(data);
      if (bad > 0) {
        data = this.repair(data, position === 0);
        this.noteNonFinite(step, position, bad);
        this.run(data, u);
      }
    }
    const m = Math.max(Math.abs(this.stats.min), Math.abs(this.stats.max));
    if (n > 0 && m > this.magnitude) {
      // The floor of this pass was too small for this step's magnitude: measure again.
      this.magnitude = m;
      this.run(data, u);
    }
    this.record(step, position, u, bad, data);
    this.prev.set(data);
  }

  /** One sweep with the floor of the current magnitude. */
  private run(data: FieldArray, u: number): void {
    const floor = valueFloor(u, this.magnitude);
    this.limits.floor = floor;
    this.limits.upperLimit = this.upperBound + floor;
    this.limits.lowerLimit = this.lowerBound - floor;
    const n = this.layout.cells;
    if (n === 0) {
      Object.assign(this.stats, createStats());
      return;
    }
    if (this.fast1d) {
      pass1d(data, n, this.layout.periodic[0]!, this.limits, this.widths1d, this.stats);
      if (this.widths1d === null) {
        this.stats.mass *= this.uniformSize;
        this.stats.l1 *= this.uniformSize;
      }
    } else {
      const { shape, strides, periodic } = this.layout;
      passNd(data, shape, strides, periodic, this.limits, this.sizes, this.nd!, this.stats);
    }
  }

  /** Copy of `data` with each NaN or infinity replaced by the previous step's value (0 first). */
  private repair(data: FieldArray, first: boolean): Float64Array {
    if (this.scratch === null) this.scratch = new Float64Array(data.length);
    const out = this.scratch;
    const prev = this.prev;
    for (let i = 0; i < data.length; i++) {
      const v = data[i]!;
      out[i] = v - v === 0 ? v : first ? 0 : prev[i]!;
    }
    return out;
  }

  private noteNonFinite(step: Step, position: number, count: number): void {
    if (this.nonFinite === null) {
      const cell = firstNonFinite(step.values);
      this.nonFinite = {
        firstStep: step.index,
        firstPosition: position,
        firstTime: Number.isFinite(step.time) ? step.time : null,
        firstCell: cell,
        firstCellIndex: unravelIndex(cell, this.layout.shape),
        firstCellCoordinates: this.coordinatesOf(cell),
        count: 0,
        steps: 0,
      };
    }
    this.nonFinite.count += count;
    this.nonFinite.steps += 1;
  }

  private record(step: Step, position: number, u: number, bad: number, data: FieldArray): void {
    const s = this.series;
    const st = this.stats;
    const n = this.layout.cells;
    const binary = isBinary(this.info.precision);
    if (position === 0) {
      this.fixFirstStepBounds(n);
      if (n > 0) {
        this.samplingGap = {
          upper: this.peakGap(data, st.argMax),
          lower: this.peakGap(data, st.argMin),
        };
      }
    }
    const tv = st.tv;
    const noise = tvNoise({
      u,
      binary,
      magnitude: this.magnitude,
      weight: st.weight,
      weightedMagnitude: st.weightedMagnitude,
      tv,
    });
    const tvRef = position === 0 ? tv : s.tv[0]!;
    const change = position === 0 ? 0 : tv - s.tv[position - 1]!;
    const massScale = position === 0 ? st.l1 : this.massScale();
    s.index.push(step.index);
    s.time.push(Number.isFinite(step.time) ? step.time : null);
    s.tv.push(tv);
    s.tvChange.push(change);
    s.tvChangeRelative.push(change / (tvRef > 0 ? tvRef : 1));
    s.tvNoise.push(noise);
    s.samplingAllowance.push(st.allowance);
    s.extrema.push(st.extrema);
    s.newExtrema.push(position === 0 ? 0 : Math.max(0, st.extrema - s.extrema[position - 1]!));
    s.min.push(n > 0 ? st.min : 0);
    s.max.push(n > 0 ? st.max : 0);
    s.argMin.push(st.argMin);
    s.argMax.push(st.argMax);
    s.argMinCoordinates.push(this.coordinatesOf(st.argMin));
    s.argMaxCoordinates.push(this.coordinatesOf(st.argMax));
    s.overshoot.push(n > 0 ? Math.max(0, st.max - this.upperBound) : 0);
    s.undershoot.push(n > 0 ? Math.max(0, this.lowerBound - st.min) : 0);
    s.violatingCells.push(st.above + st.below);
    s.magnitude.push(this.magnitude);
    s.unitRoundoff.push(u);
    s.valueFloor.push(this.limits.floor);
    s.mass.push(st.mass);
    s.massDrift.push(position === 0 ? 0 : (st.mass - s.mass[0]!) / (massScale > 0 ? massScale : 1));
    s.massNoise.push(massNoise({ u, binary, magnitude: this.magnitude, l1: st.l1, totalSize: this.totalSize }));
    s.nonFinite.push(bad);
    if (position > 0 && change > noise + s.tvNoise[position - 1]!) {
      const location = this.locate(data, position, step.index);
      if (location !== null) this.growth.push(location);
    }
  }

  /**
   * 1/4 of the sum of the two differences next to cell c, largest over the axes: by how much a
   * smooth (locally quadratic) profile's true peak may exceed the sampled value at c, with a
   * factor 2 to spare (docs/metrics.md, smooth profiles).
   */
  private peakGap(data: FieldArray, c: number): number {
    const { shape, strides, periodic } = this.layout;
    const index = unravelIndex(c, shape);
    let gap = 0;
    for (let k = 0; k < shape.length; k++) {
      const size = shape[k]!;
      if (size < 2) continue;
      const pos = index[k]!;
      const stride = strides[k]!;
      const back = pos > 0 ? c - stride : periodic[k] ? c + (size - 1) * stride : -1;
      const fwd = pos < size - 1 ? c + stride : periodic[k] ? c - (size - 1) * stride : -1;
      const v = data[c]!;
      const sum = (back >= 0 ? Math.abs(v - data[back]!) : 0) + (fwd >= 0 ? Math.abs(data[fwd]! - v) : 0);
      gap = Math.max(gap, 0.25 * sum);
    }
    return gap;
  }

  /** Cell-centre coordinates of a flat cell index, one per axis (empty grid: none). */
  private coordinatesOf(cell: number): number[] {
    if (this.layout.cells === 0) return [];
    const index = unravelIndex(cell, this.layout.shape);
    return index.map((i, k) => axisCentre(this.info.grid.axes[k]!, i));
  }

  private massScale(): number {
    const l1 = this.firstL1;
    return l1 > 0 ? l1 : 1;
  }

  /** After the first step: bounds default to its range; the mass scale is its L1 mass. */
  private fixFirstStepBounds(n: number): void {
    const b = this.info.options?.bounds;
    if (b?.lower === undefined) this.lowerBound = n > 0 ? this.stats.min : 0;
    if (b?.upper === undefined) this.upperBound = n > 0 ? this.stats.max : 0;
    this.firstL1 = this.stats.l1;
  }

  /**
   * Growth window (per axis) and, with a velocity sign, the side of the front. Needs the previous
   * step's values, so it runs before `prev` is overwritten; only for steps whose TV grew beyond
   * the noise floor, which keeps the extra sweep off clean runs.
   */
  private locate(data: FieldArray, position: number, stepIndex: number): GrowthLocation | null {
    const { shape, strides, periodic } = this.layout;
    const windows: SumWindow[] = [];
    if (this.fast1d) {
      if (this.increase === null) this.increase = new Float64Array(this.layout.cells);
      const edges = increase1d(data, this.prev, shape[0]!, periodic[0]!, this.increase);
      const w = maxSumWindow(this.increase, edges, periodic[0]!);
      if (w === null) return null;
      windows.push(w);
    } else {
      if (this.marginals === null) this.marginals = shape.map((size) => new Float64Array(size));
      increaseMarginals(data, this.prev, shape, strides, periodic, this.marginals, this.nd!.coord);
      for (let k = 0; k < shape.length; k++) {
        const w = maxSumWindow(this.marginals[k]!, shape[k]!, periodic[k]!);
        if (w === null) return null;
        windows.push(w);
      }
    }
    const ranges = windows.map((w, k) => this.cellRange(k, w));
    const location: GrowthLocation = {
      position,
      step: stepIndex,
      ranges,
      growth: windows[windows.length - 1]!.sum,
    };
    const velocity = this.info.options?.velocitySign;
    if (velocity !== undefined) {
      const front = this.frontOf(data, windows, velocity);
      if (front !== undefined) location.front = front;
    }
    return location;
  }

  /**
   * Cells covered by a window of edge-owning cells: the window's cells plus the far end of each
   * difference, i.e. first..last+1 (wrapping on periodic axes, clipped on the others).
   */
  private cellRange(k: number, w: SumWindow): CellRange {
    const size = this.layout.shape[k]!;
    const axis = this.info.grid.axes[k]!;
    const end = w.last + 1 < size ? w.last + 1 : this.layout.periodic[k] ? 0 : size - 1;
    const last = size > 1 ? end : w.last;
    return {
      axis: axis.name,
      first: w.first,
      last,
      firstCoordinate: axisCentre(axis, w.first),
      lastCoordinate: axisCentre(axis, last),
    };
  }

  /** Side of the front along the fastest axis, on the line through the window's busiest cells. */
  private frontOf(data: FieldArray, windows: SumWindow[], velocity: 1 | -1): GrowthLocation['front'] {
    const { shape, strides, periodic } = this.layout;
    const fast = shape.length - 1;
    let offset = 0;
    for (let k = 0; k < fast; k++) {
      offset += busiestIndex(this.marginals![k]!, shape[k]!, windows[k]!) * strides[k]!;
    }
    const w = windows[fast]!;
    const side = frontSide(
      data,
      shape[fast]!,
      offset,
      1,
      periodic[fast]!,
      w.first,
      w.last,
      velocity,
      this.limits.floor,
    );
    if (side.frontEdge < 0) return undefined;
    const axis = this.info.grid.axes[fast]!;
    return {
      axis: axis.name,
      cell: side.frontEdge,
      coordinate: axisCentre(axis, side.frontEdge),
      relation: side.relation,
    };
  }

  finish(): VariableSummary {
    this.finished = true;
    const series = saturateSeries(this.series);
    const base = {
      version: SUMMARY_VERSION,
      variable: this.variable,
      shape: [...this.layout.shape],
      axes: this.info.grid.axes.map((a, k) => ({
        name: a.name,
        size: a.size,
        periodic: this.layout.periodic[k]!,
      })),
      cells: this.layout.cells,
      precision: { ...this.info.precision },
      options: structuredClone(this.info.options ?? {}),
      tvReference: series.tv.length > 0 && series.tv[0]! > 0 ? series.tv[0]! : 1,
      massScale: this.massScale(),
      samplingGap: { upper: finiteOrMax(this.samplingGap.upper), lower: finiteOrMax(this.samplingGap.lower) },
      totalSize: finiteOrMax(this.totalSize),
      bounds: {
        lower: finiteOrMax(Number.isFinite(this.lowerBound) ? this.lowerBound : 0),
        upper: finiteOrMax(Number.isFinite(this.upperBound) ? this.upperBound : 0),
        lowerSource: this.info.options?.bounds?.lower !== undefined ? ('physical' as const) : ('first-step' as const),
        upperSource: this.info.options?.bounds?.upper !== undefined ? ('physical' as const) : ('first-step' as const),
      },
      series,
      growth: this.growth.map((g) => structuredClone(g)),
      nonFinite: this.nonFinite === null ? null : { ...this.nonFinite },
      metrics: summaryMetrics(series, this.nonFinite),
      verdict: 'pass' as const,
      findings: [],
    } satisfies VariableSummary;
    const judged = judge(base, this.policy);
    return { ...base, verdict: judged.verdict, findings: judged.findings };
  }
}

function allFinite(st: StepStats): boolean {
  return Number.isFinite(st.mass) && Number.isFinite(st.tv) && Number.isFinite(st.l1);
}

/** Largest |x| over the finite values (0 for none). */
function maxAbsFinite(x: FieldArray): number {
  let m = 0;
  for (let i = 0; i < x.length; i++) {
    const v = x[i]!;
    const a = v < 0 ? -v : v;
    if (a > m && a !== Infinity) m = a;
  }
  return m;
}

function countNonFinite(x: FieldArray): number {
  let count = 0;
  for (let i = 0; i < x.length; i++) {
    const v = x[i]!;
    if (v - v !== 0) count++;
  }
  return count;
}

function firstNonFinite(x: FieldArray): number {
  for (let i = 0; i < x.length; i++) {
    const v = x[i]!;
    if (v - v !== 0) return i;
  }
  return -1;
}

/** Index within the window where a marginal is largest (the window's busiest line). */
function busiestIndex(marginal: Float64Array, size: number, w: SumWindow): number {
  const span = w.last >= w.first ? w.last - w.first + 1 : w.last + size - w.first + 1;
  let best = w.first;
  let bestValue = -Infinity;
  for (let k = 0; k < span; k++) {
    const i = (w.first + k) % size;
    if (marginal[i]! > bestValue) {
      bestValue = marginal[i]!;
      best = i;
    }
  }
  return best;
}

function finiteOrMax(x: number): number {
  if (Number.isFinite(x)) return x;
  if (Number.isNaN(x)) return 0;
  return x > 0 ? Number.MAX_VALUE : -Number.MAX_VALUE;
}

/** Copies the series, saturating overflowed sums so the summary stays valid JSON. */
function saturateSeries(s: StepSeries): StepSeries {
  const out = {} as Record<keyof StepSeries, unknown>;
  for (const key of Object.keys(s) as (keyof StepSeries)[]) {
    const values = s[key];
    out[key] =
      key === 'time'
        ? [...values]
        : key === 'argMinCoordinates' || key === 'argMaxCoordinates'
          ? (values as number[][]).map((c) => c.map(finiteOrMax))
          : (values as number[]).map(finiteOrMax);
  }
  return out as StepSeries;
}

function summaryMetrics(s: StepSeries, nonFinite: NonFiniteSummary | null): SummaryMetrics {
  const steps = s.tv.length;
  let maxGrowth = 0;
  let maxGrowthRel = 0;
  let maxGrowthStep: number | null = null;
  for (let n = 1; n < steps; n++) {
    if (s.tvChange[n]! > maxGrowth) {
      maxGrowth = s.tvChange[n]!;
      maxGrowthRel = s.tvChangeRelative[n]!;
      maxGrowthStep = s.index[n]!;
    }
  }
  const max = (xs: number[]): number => xs.reduce((a, b) => (b > a ? b : a), 0);
  const tvFirst = s.tv[0] ?? 0;
  const tvLast = s.tv[steps - 1] ?? 0;
  return {
    steps,
    tvFirst,
    tvLast,
    maxTvGrowth: maxGrowth,
    maxTvGrowthRelative: maxGrowthRel,
    maxTvGrowthStep: maxGrowthStep,
    totalTvChangeRelative: (tvLast - tvFirst) / (tvFirst > 0 ? tvFirst : 1),
    maxNewExtrema: max(s.newExtrema),
    maxOvershoot: max(s.overshoot),
    maxUndershoot: max(s.undershoot),
    maxViolatingCells: max(s.violatingCells),
    maxMassDrift: max(s.massDrift.map(Math.abs)),
    nonFiniteValues: nonFinite?.count ?? 0,
  };
}
