/**
 * Reducing a long 1D profile to what a chart can show without hiding what matters: the maxima
 * and minima. Pure functions, used by the API (never in the browser: a million-cell step is
 * decimated on the server before it is sent).
 */

export interface DecimatedSeries {
  /** Cell indices of the kept points, strictly increasing. */
  index: number[];
  values: number[];
  /** True when every input point was kept. */
  complete: boolean;
}

/** Indices of strict local extrema (plateaus once, at their first cell) plus both ends. */
export function extremumIndices(values: ArrayLike<number>): number[] {
  const n = values.length;
  if (n <= 2) return Array.from({ length: n }, (_, i) => i);
  const kept = [0];
  let i = 1;
  while (i < n - 1) {
    // Walk over a plateau: [i, j) all equal.
    let j = i + 1;
    while (j < n - 1 && values[j] === values[i]) j++;
    const left = values[i - 1]!;
    const right = values[j]!;
    const v = values[i]!;
    if ((v > left && v > right) || (v < left && v < right)) kept.push(i);
    i = j;
  }
  kept.push(n - 1);
  return kept;
}

/**
 * Keeps at most `maxPoints` points. When the profile has at most that many local extrema, all of
 * them are kept and the remaining budget is spent on evenly spread cells so that slopes keep
 * their shape; otherwise each of `maxPoints / 2` equal buckets keeps its minimum and maximum
 * (in index order), which keeps the visual envelope (min/max decimation, common practice for
 * plotting large series).
 */
export function decimateKeepingExtrema(values: ArrayLike<number>, maxPoints: number): DecimatedSeries {
  const n = values.length;
  if (maxPoints < 4) throw new RangeError('maxPoints must be at least 4');
  if (n <= maxPoints) {
    return {
      index: Array.from({ length: n }, (_, i) => i),
      values: Array.from(values as ArrayLike<number>),
      complete: true,
    };
  }
  const extrema = extremumIndices(values);
  let chosen: number[];
  if (extrema.length <= maxPoints) {
    const budget = maxPoints - extrema.length;
    const fill: number[] = [];
    for (let k = 1; k <= budget; k++) fill.push(Math.floor((k * (n - 1)) / (budget + 1)));
    chosen = mergeSorted(extrema, fill);
  } else {
    chosen = bucketMinMax(values, Math.floor(maxPoints / 2));
  }
  return { index: chosen, values: chosen.map((i) => values[i]!), complete: false };
}

function bucketMinMax(values: ArrayLike<number>, buckets: number): number[] {
  const n = values.length;
  const out: number[] = [];
  for (let b = 0; b < buckets; b++) {
    const start = Math.floor((b * n) / buckets);
    const end = Math.floor(((b + 1) * n) / buckets);
    if (end <= start) continue;
    let lo = start;
    let hi = start;
    for (let i = start + 1; i < end; i++) {
      const v = values[i]!;
      // NaN never wins a comparison, so it would vanish; keep it visible as the bucket's "max".
      if (Number.isNaN(v) && !Number.isNaN(values[hi]!)) hi = i;
      else if (v < values[lo]!) lo = i;
      else if (v > values[hi]!) hi = i;
    }
    if (lo === hi) out.push(lo);
    else out.push(Math.min(lo, hi), Math.max(lo, hi));
  }
  return out;
}

/** Union of two increasing index lists, increasing, without repeats. */
function mergeSorted(a: number[], b: number[]): number[] {
  const out: number[] = [];
  let i = 0;
  let j = 0;
  while (i < a.length || j < b.length) {
    const next = j >= b.length || (i < a.length && a[i]! <= b[j]!) ? a[i++]! : b[j++]!;
    if (out.length === 0 || out[out.length - 1] !== next) out.push(next);
  }
  return out;
}

/**
 * Block-averages a row-major 2D field [ny, nx] down to at most maxRows x maxCols, for heat maps.
 * Each output cell is the mean of its block; NaN cells propagate so a blow-up stays visible.
 */
export function downsample2d(values: ArrayLike<number>, ny: number, nx: number, maxRows: number, maxCols: number) {
  const rows = Math.min(ny, maxRows);
  const cols = Math.min(nx, maxCols);
  const out = new Array<number>(rows * cols).fill(0);
  const counts = new Array<number>(rows * cols).fill(0);
  for (let y = 0; y < ny; y++) {
    const r = Math.floor((y * rows) / ny);
    for (let x = 0; x < nx; x++) {
      const c = Math.floor((x * cols) / nx);
      out[r * cols + c]! += values[y * nx + x]!;
      counts[r * cols + c]! += 1;
    }
  }
  for (let k = 0; k < out.length; k++) out[k] = out[k]! / counts[k]!;
  return { rows, cols, values: out };
}
