/**
 * Where a step's total variation grew. Two parts:
 *
 * 1. The window: the contiguous range of cells with the largest sum of local-variation increase,
 *    g_i = lv_i(step n) - lv_i(step n-1), lv_i = sum over axes of |phi(i + e_axis) - phi(i)|
 *    (each forward difference is attributed to the cell it starts from). The g_i add up to the TV
 *    change. Kadane's maximum-subarray scan finds the window, with one change: a run of at least
 *    GROWTH_GAP cells where the local variation did not grow ends the window, so growth at two
 *    separate fronts is reported as the larger of the two rather than one window spanning the
 *    quiet cells between them (a heuristic of ours). On a periodic line the scan starts after such
 *    a gap, so windows may wrap round; without any gap the plain circular scan is used (maximum of
 *    the linear best and the total minus the minimum-sum window). On 2D/3D grids the scan runs on
 *    each axis's marginal sums (g summed over the other axes), which gives a box.
 *
 * 2. The side of the front: take the steepest difference inside the window, extend it to its
 *    monotone run (the front), and weigh the non-monotone variation on each flank of the run: a
 *    cell c whose neighbouring differences exceed the noise floor and change sign is an extremum of
 *    depth 2 min(|phi_c - phi_{c-1}|, |phi_{c+1} - phi_c|); flank cells at distance k from the
 *    run's end count with weight exp(-k / 4), up to 16 cells away. With the velocity sign, the
 *    flank with the larger weighted depth is "upstream" (behind the front, where Lax-Wendroff's
 *    dispersive ripples sit) or "downstream" (ahead of it, Warming-Beam's). Monotone fronts that
 *    merely move carry no depth, so translation does not bias the answer. The decay length and
 *    reach are our own choice, tuned on the top-hat tests (heuristic, not from a source).
 *
 * References: Bentley 1984, "Programming pearls: algorithm design techniques" (Kadane's
 * maximum-subarray scan, Comm. ACM 27(9)); LeVeque 2002, "Finite Volume Methods for Hyperbolic
 * Problems" (section 8.6 on dispersion: Lax-Wendroff oscillations trail a discontinuity,
 * Beam-Warming oscillations lead it).
 */
import type { FieldArray } from './types';

export interface SumWindow {
  /** First index of the window. */
  first: number;
  /** Last index (inclusive); smaller than `first` when the window wraps round a periodic line. */
  last: number;
  sum: number;
}

/** Cells without growth that end a growth window. */
export const GROWTH_GAP = 4;

/**
 * Maximum-sum contiguous window of `n` values (Kadane's scan), ended by any run of `gap` or more
 * values <= 0; with `circular` the window may wrap round the end (rules: file comment). Returns
 * null for n = 0 or when no window has a positive sum; ties keep the earliest window. The window
 * starts and ends on positive values. NaN values count as <= 0.
 *
 * References: Bentley 1984, "Programming pearls: algorithm design techniques" (Comm. ACM 27(9)).
 */
export function maxSumWindow(
  g: ArrayLike<number>,
  n: number,
  circular: boolean,
  gap: number = GROWTH_GAP,
): SumWindow | null {
  if (n === 0) return null;
  let start = 0;
  if (circular) {
    start = startAfterGap(g, n, gap);
    if (start < 0) return circularWindow(g, n);
  }
  let run = 0;
  let runFirst = 0;
  let best = -Infinity;
  let bestFirst = 0;
  let bestLast = 0;
  let quiet = 0;
  for (let k = 0; k < n; k++) {
    const v = g[(start + k) % n]!;
    if (run > 0 && quiet < gap) run += v;
    else {
      run = v;
      runFirst = k;
    }
    if (run > best) {
      best = run;
      bestFirst = k;
      bestFirst = runFirst;
      bestLast = k;
    }
    quiet = v > 0 ? 0 : quiet + 1;
  }
  if (!(best > 0)) return null;
  return trimWindow({ first: (start + bestFirst) % n, last: (start + bestLast) % n, sum: best }, n, g);
}

/** Index just after the first run of `gap` values <= 0 on a cyclic line, or -1 if none. */
function startAfterGap(g: ArrayLike<number>, n: number, gap: number): number {
  let quiet = 0;
  for (let k = 0; k < 2 * n; k++) {
    const i = k % n;
    if (g[i]! > 0) quiet = 0;
    else if (++quiet >= gap) return (i + 1) % n;
  }
  return -1;
}

/** Plain circular Kadane: max(linear best, total - linear minimum). */
function circularWindow(g: ArrayLike<number>, n: number): SumWindow | null {
  let run = 0;
  let runFirst = 0;
  let best = -Infinity;
  let bestFirst = 0;
  let bestLast = 0;
  let low = 0;
  let lowFirst = 0;
  let worst = Infinity;
  let worstFirst = 0;
  let worstLast = 0;
  let total = 0;
  for (let i = 0; i < n; i++) {
    const v = g[i]!;
    total += v;
    if (run > 0) run += v;
    else {
      run = v;
      runFirst = i;
    }
    if (run > best) {
      best = run;
      bestFirst = runFirst;
      bestLast = i;
    }
    if (low < 0) low += v;
    else {
      low = v;
      lowFirst = i;
    }
    if (low < worst) {
      worst = low;
      worstFirst = lowFirst;
      worstLast = i;
    }
  }
  let window: SumWindow = { first: bestFirst, last: bestLast, sum: best };
  if (worstLast - worstFirst + 1 < n && total - worst > best) {
    window = { first: (worstLast + 1) % n, last: (worstFirst - 1 + n) % n, sum: total - worst };
  }
  return window.sum > 0 ? trimWindow(window, n, g) : null;
}

/** Drops values <= 0 from both ends of a window (they add nothing to its sum). */
function trimWindow(w: SumWindow, n: number, g: ArrayLike<number>): SumWindow {
  let { first, last } = w;
  while (first !== last && !(g[first]! > 0)) first = (first + 1) % n;
  while (last !== first && !(g[last]! > 0)) last = (last - 1 + n) % n;
  return { first, last, sum: w.sum };
}

/**
 * Local-variation increase of a 1D line, one value per difference (edge i joins cells i and
 * i + 1; the last edge of a periodic line wraps to cell 0):
 *   g_i = |x_{i+1} - x_i| - |p_{i+1} - p_i|.
 * Writes `out[0 .. edges-1]` and returns the number of edges (n - 1, or n when periodic).
 *
 * References: Harten 1983, "High resolution schemes for hyperbolic conservation laws".
 */
export function increase1d(x: FieldArray, prev: Float64Array, n: number, periodic: boolean, out: Float64Array): number {
  const edges = n < 2 ? 0 : periodic ? n : n - 1;
  for (let i = 0; i < edges; i++) {
    const j = i + 1 < n ? i + 1 : 0;
    const d = x[j]! - x[i]!;
    const p = prev[j]! - prev[i]!;
    out[i] = (d < 0 ? -d : d) - (p < 0 ? -p : p);
  }
  return edges;
}

/**
 * Per-axis marginal sums of the local-variation increase on a grid of any dimension: for each
 * cell c, g_c = sum over axes of (|x(c + e_k) - x(c)| - |p(c + e_k) - p(c)|) (forward
 * differences, wrap-around on periodic axes, none past a non-periodic end), added to
 * marginals[k][index of c along axis k] for every axis k.
 *
 * References: Goodman & LeVeque 1985, "On the accuracy of stable schemes for 2D scalar
 * conservation laws" (total variation in 2D as the sum over axes).
 */
export function increaseMarginals(
  x: FieldArray,
  prev: Float64Array,
  shape: readonly number[],
  strides: readonly number[],
  periodic: readonly boolean[],
  marginals: Float64Array[],
  coord: Int32Array,
): void {
  const dims = shape.length;
  for (const m of marginals) m.fill(0);
  coord.fill(0);
  for (let c = 0; c < x.length; c++) {
    const v = x[c]!;
    const pv = prev[c]!;
    let g = 0;
    for (let k = 0; k < dims; k++) {
      const n = shape[k]!;
      if (n < 2) continue;
      const pos = coord[k]!;
      const fwd = pos < n - 1 ? c + strides[k]! : periodic[k] ? c - (n - 1) * strides[k]! : -1;
      if (fwd < 0) continue;
      const d = x[fwd]! - v;
      const p = prev[fwd]! - pv;
      g += (d < 0 ? -d : d) - (p < 0 ? -p : p);
    }
    for (let k = 0; k < dims; k++) {
      const m = marginals[k]!;
      const at = coord[k]!;
      m[at] = m[at]! + g;
    }
    for (let k = dims - 1; k >= 0; k--) {
      const next = coord[k]! + 1;
      if (next < shape[k]!) {
        coord[k] = next;
        break;
      }
      coord[k] = 0;
    }
  }
}

export type FrontRelation = 'upstream' | 'downstream' | 'undetermined';

export interface FrontSide {
  relation: FrontRelation;
  /** Index of the steepest difference (between cells frontEdge and frontEdge + 1), or -1. */
  frontEdge: number;
  /** Weighted extremum depth behind and ahead of the front. */
  upstreamDepth: number;
  downstreamDepth: number;
}

/** Decay length and reach, in cells, of the flank weights (see the file comment). */
export const FLANK_DECAY = 4;
export const FLANK_REACH = 16;

/**
 * Side of the front on which the non-monotone variation sits (rule: file comment). The line has
 * `n` values at `offset + k * stride`; the window covers the cells first..last (wrapping when
 * last < first on a periodic line); `velocitySign` is +1 when the flow goes towards larger
 * indices. Returns 'undetermined' with frontEdge -1 when the window holds no difference above
 * `floor`, and 'undetermined' when both flanks weigh the same.
 *
 * References: LeVeque 2002, "Finite Volume Methods for Hyperbolic Problems", section 8.6.
 */
export function frontSide(
  x: ArrayLike<number>,
  n: number,
  offset: number,
  stride: number,
  periodic: boolean,
  first: number,
  last: number,
  velocitySign: 1 | -1,
  floor: number,
): FrontSide {
  const none: FrontSide = {
    relation: 'undetermined',
    frontEdge: -1,
    upstreamDepth: 0,
    downstreamDepth: 0,
  };
  if (n < 2) return none;
  // diff(e) = x[e + 1] - x[e] on the line; NaN where the edge does not exist.
  const at = (i: number): number => {
    if (periodic) return x[offset + (((i % n) + n) % n) * stride]!;
    return i >= 0 && i < n ? x[offset + i * stride]! : Number.NaN;
  };
  const diff = (e: number): number => at(e + 1) - at(e);
  const sign = (d: number): number => (d > floor ? 1 : d < -floor ? -1 : 0);
  const span = last >= first ? last - first + 1 : last + n - first + 1;
  let steepest = -1;
  let steepestSize = floor;
  // The window may be the whole line: scan it with plain index arithmetic.
  for (let k = 0; k < span; k++) {
    const e = first + k;
    const i = e % n;
    const j = (e + 1) % n;
    if (!periodic && e + 1 >= n) break;
    const size = Math.abs(x[offset + j * stride]! - x[offset + i * stride]!);
    if (size > steepestSize) {
      steepestSize = size;
      steepest = e;
    }
  }
  if (steepest < 0) return none;
  const s = sign(diff(steepest));
  let lo = steepest;
  let hi = steepest;
  while (hi - lo < n && sign(diff(hi + 1)) === s) hi++;
  while (hi - lo < n && sign(diff(lo - 1)) === s) lo--;
  const depth = (c: number): number => {
    const before = diff(c - 1);
    const after = diff(c);
    const a = sign(before);
    const b = sign(after);
    return a !== 0 && b !== 0 && a !== b ? 2 * Math.min(Math.abs(before), Math.abs(after)) : 0;
  };
  let below = 0; // towards smaller indices, starting at the run's first cell
  let above = 0; // towards larger indices, starting at the run's last cell
  for (let k = 0; k <= FLANK_REACH; k++) {
    const w = Math.exp(-k / FLANK_DECAY);
    below += w * depth(lo - k);
    above += w * depth(hi + 1 + k);
  }
  const upstreamDepth = velocitySign > 0 ? below : above;
  const downstreamDepth = velocitySign > 0 ? above : below;
  const relation: FrontRelation =
    upstreamDepth > downstreamDepth ? 'upstream' : downstreamDepth > upstreamDepth ? 'downstream' : 'undetermined';
  const frontEdge = periodic ? ((steepest % n) + n) % n : steepest;
  return { relation, frontEdge, upstreamDepth, downstreamDepth };
}
