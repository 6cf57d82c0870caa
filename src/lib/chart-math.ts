/**
 * The arithmetic behind the run page's charts, kept apart from drawing so it can be tested:
 * domains and scales, tick counts, nearest-point look-up, the cell window of a finding, spans of
 * cells outside the bounds, and heat-map block coordinates. The chart components in
 * src/components/charts only draw what these return.
 */
import { scaleLinear, type ScaleLinear } from 'd3';

export type Domain = [number, number];

export interface Frame {
  width: number;
  height: number;
  margin: { top: number; right: number; bottom: number; left: number };
}

/**
 * Smallest and largest finite value over several columns (nulls, NaN and infinities skipped) and
 * the extra values in `include`, widened by `pad` of the range on each side. An empty input gives
 * [0, 1]; a single value v gives a range around v, so a flat curve sits mid-chart, not on an edge.
 */
export function extentOf(
  columns: readonly (readonly (number | null | undefined)[])[],
  options: { include?: readonly number[]; pad?: number } = {},
): Domain {
  let lo = Infinity;
  let hi = -Infinity;
  const see = (v: number | null | undefined): void => {
    if (v === null || v === undefined || !Number.isFinite(v)) return;
    if (v < lo) lo = v;
    if (v > hi) hi = v;
  };
  for (const column of columns) for (const v of column) see(v);
  for (const v of options.include ?? []) see(v);
  if (lo > hi) return [0, 1];
  if (lo === hi) {
    const half = lo === 0 ? 1 : Math.abs(lo) * 0.05;
    return [lo - half, hi + half];
  }
  const pad = (hi - lo) * (options.pad ?? 0.05);
  return [lo - pad, hi + pad];
}

/** Tick count that keeps labels about `spacing` pixels apart, at least 2. */
export function tickCount(pixels: number, spacing = 70): number {
  return Math.max(2, Math.floor(pixels / spacing));
}

/** The drawing area inside the margins, in pixels. */
export function innerSize(frame: Frame): { width: number; height: number } {
  return {
    width: Math.max(1, frame.width - frame.margin.left - frame.margin.right),
    height: Math.max(1, frame.height - frame.margin.top - frame.margin.bottom),
  };
}

/** x and y linear scales of a frame; the y domain is rounded to nice tick values, x is not (steps and cells are exact). */
export function frameScales(
  frame: Frame,
  xDomain: Domain,
  yDomain: Domain,
): { x: ScaleLinear<number, number>; y: ScaleLinear<number, number> } {
  const { width, height } = innerSize(frame);
  const x = scaleLinear().domain(xDomain).range([0, width]);
  const y = scaleLinear().domain(yDomain).range([height, 0]).nice(tickCount(height, 40));
  return { x, y };
}

/**
 * Index of the entry of increasing `xs` nearest to `x` (ties go to the smaller index); -1 when
 * `xs` is empty. Binary search: O(log n) per mouse move on 5,000 steps.
 */
export function nearestIndex(xs: ArrayLike<number>, x: number): number {
  const n = xs.length;
  if (n === 0) return -1;
  let lo = 0;
  let hi = n - 1;
  if (!(x > xs[lo]!)) return lo;
  if (!(x < xs[hi]!)) return hi;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (xs[mid]! <= x) lo = mid;
    else hi = mid;
  }
  return x - xs[lo]! <= xs[hi]! - x ? lo : hi;
}

/** Position of `value` in increasing `xs`, or -1 when it is not there. */
export function indexOfSorted(xs: ArrayLike<number>, value: number): number {
  const i = nearestIndex(xs, value);
  return i >= 0 && xs[i] === value ? i : -1;
}

/** Clamps a position into [0, count - 1]; 0 for an empty list. */
export function clampPosition(position: number, count: number): number {
  if (count <= 0) return 0;
  return Math.min(count - 1, Math.max(0, Math.round(position)));
}

export interface CellWindow {
  from: number;
  to: number;
}

/**
 * The cells to show when zooming to a finding's range [first, last] on a line of `size` cells:
 * the range plus half its width on each side, at least `minHalf` cells around its centre, clamped
 * to the line. A range that wraps round a periodic line (last < first) shows the whole line.
 */
export function cellWindow(first: number, last: number, size: number, minHalf = 8): CellWindow {
  if (size <= 0) return { from: 0, to: 0 };
  if (last < first) return { from: 0, to: size - 1 };
  const width = last - first;
  const centre = (first + last) / 2;
  const half = Math.max(minHalf, width);
  const from = Math.max(0, Math.floor(centre - half));
  const to = Math.min(size - 1, Math.ceil(centre + half));
  return { from, to };
}

export interface BoundSpan {
  /** Cell coordinates of the span's edges (half-way to the neighbouring kept points). */
  from: number;
  to: number;
  side: 'over' | 'under';
}

/**
 * Runs of consecutive points of a profile (cells `index`, increasing) that lie above
 * upper + tolerance or below lower - tolerance, as spans in cell coordinates for shading. Each
 * span reaches half-way to the neighbouring points inside the bounds, and at least half a cell
 * around a single point.
 */
export function outOfBoundsSpans(
  index: readonly number[],
  values: readonly (number | null)[],
  bounds: { lower: number; upper: number },
  tolerance = 0,
): BoundSpan[] {
  const sideOf = (v: number | null | undefined): BoundSpan['side'] | null => {
    if (v === null || v === undefined || !Number.isFinite(v)) return null;
    if (v > bounds.upper + tolerance) return 'over';
    if (v < bounds.lower - tolerance) return 'under';
    return null;
  };
  const spans: BoundSpan[] = [];
  let i = 0;
  while (i < index.length) {
    const side = sideOf(values[i]);
    if (side === null) {
      i++;
      continue;
    }
    let j = i;
    while (j + 1 < index.length && sideOf(values[j + 1]) === side) j++;
    const left = i > 0 ? (index[i - 1]! + index[i]!) / 2 : index[i]! - 0.5;
    const right = j + 1 < index.length ? (index[j]! + index[j + 1]!) / 2 : index[j]! + 0.5;
    spans.push({ from: Math.min(left, index[i]! - 0.5), to: Math.max(right, index[j]! + 0.5), side });
    i = j + 1;
  }
  return spans;
}

/** [-m, m] with m the largest finite |value| (a diverging colour scale centred on zero); [-1, 1] when all are zero. */
export function symmetricExtent(values: readonly (number | null)[]): Domain {
  let m = 0;
  for (const v of values) if (v !== null && Number.isFinite(v) && Math.abs(v) > m) m = Math.abs(v);
  return m > 0 ? [-m, m] : [-1, 1];
}

/**
 * The block (row or column of a downsampled heat map) that cell `cell` of an axis of `size` cells
 * falls in when it is reduced to `blocks` blocks; the inverse of decimate.ts's downsample2d.
 */
export function blockOf(cell: number, size: number, blocks: number): number {
  if (size <= 0 || blocks <= 0) return 0;
  return Math.min(blocks - 1, Math.max(0, Math.floor((cell * blocks) / size)));
}

/** Block range covered by a cell range [first, last]; wrapping ranges cover the whole axis. */
export function blockRange(first: number, last: number, size: number, blocks: number): { from: number; to: number } {
  if (last < first) return { from: 0, to: blocks - 1 };
  return { from: blockOf(first, size, blocks), to: blockOf(last, size, blocks) };
}

/** A value for labels and tooltips: four significant digits, exponent form when tiny or huge. */
export function formatNumber(x: number | null | undefined): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return '–';
  if (x === 0) return '0';
  const a = Math.abs(x);
  if (a >= 1e-3 && a < 1e6) return String(Number(x.toPrecision(4)));
  return x.toExponential(2);
}

/** "Step 140 · t = 0.35" (the time is left out when the input has none). */
export function stepLabel(step: number, time: number | null | undefined): string {
  return time === null || time === undefined ? `Step ${step}` : `Step ${step} · t = ${formatNumber(time)}`;
}
