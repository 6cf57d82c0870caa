/**
 * Where variation grew between two steps, cell by cell, for the growth heat map of the run page.
 *
 * Local variation of cell c: lv(c) = sum over axes k of |phi(c + e_k) - phi(c)|, each forward
 * difference attributed to the cell it starts from; on a periodic axis the last cell's difference
 * wraps to the first, on a non-periodic axis the last cell has none along that axis. Summed over
 * all cells this is the total variation (sum over axes), so the growth g(c) = lv_n(c) - lv_{n-1}(c)
 * adds up to TV_n - TV_{n-1}. It is the same attribution the analyser uses to locate findings
 * (src/analysis/localise.ts), kept here as a full field instead of marginal sums.
 *
 * Layout: row-major, last axis fastest (`values[z][y][x]`), shape slowest axis first.
 */

/** Strides of a row-major shape: the last axis has stride 1. */
export function stridesOf(shape: readonly number[]): number[] {
  const strides = new Array<number>(shape.length).fill(1);
  for (let k = shape.length - 2; k >= 0; k--) strides[k] = strides[k + 1]! * shape[k + 1]!;
  return strides;
}

function cellCountOf(shape: readonly number[]): number {
  let n = 1;
  for (const size of shape) n *= size;
  return n;
}

/**
 * Adds sign * lv(c) of `values` to out[c] for every cell, in one pass without allocation per
 * cell: a coordinate counter replaces divisions.
 */
function addLocalVariation(
  values: ArrayLike<number>,
  shape: readonly number[],
  periodic: readonly boolean[],
  sign: number,
  out: Float64Array,
): void {
  const dims = shape.length;
  const strides = stridesOf(shape);
  const coord = new Int32Array(dims);
  const cells = out.length;
  for (let c = 0; c < cells; c++) {
    const v = values[c]!;
    let lv = 0;
    for (let k = 0; k < dims; k++) {
      const size = shape[k]!;
      if (size < 2) continue;
      const pos = coord[k]!;
      let next: number;
      if (pos < size - 1) next = c + strides[k]!;
      else if (periodic[k]) next = c - (size - 1) * strides[k]!;
      else continue;
      const d = values[next]! - v;
      lv += d < 0 ? -d : d;
    }
    out[c]! += sign * lv;
    // Advance the coordinate counter (last axis fastest).
    for (let k = dims - 1; k >= 0; k--) {
      if (++coord[k]! < shape[k]!) break;
      coord[k] = 0;
    }
  }
}

function checkSizes(values: ArrayLike<number>, shape: readonly number[], periodic: readonly boolean[]): number {
  const cells = cellCountOf(shape);
  if (values.length !== cells) throw new RangeError(`values has ${values.length} entries, the shape ${cells} cells`);
  if (periodic.length !== shape.length)
    throw new RangeError(`periodic has ${periodic.length} entries, the shape ${shape.length} axes`);
  return cells;
}

/** lv(c) for every cell (definition: file comment). NaN values give NaN where they take part. */
export function localVariation(
  values: ArrayLike<number>,
  shape: readonly number[],
  periodic: readonly boolean[],
): Float64Array {
  const out = new Float64Array(checkSizes(values, shape, periodic));
  addLocalVariation(values, shape, periodic, 1, out);
  return out;
}

/**
 * g(c) = lv_current(c) - lv_previous(c) for every cell; positive where variation grew. The sum
 * over the cells equals TV(current) - TV(previous) up to rounding.
 */
export function variationGrowth(
  current: ArrayLike<number>,
  previous: ArrayLike<number>,
  shape: readonly number[],
  periodic: readonly boolean[],
): Float64Array {
  const cells = checkSizes(current, shape, periodic);
  if (previous.length !== cells) throw new RangeError(`previous has ${previous.length} entries, current ${cells}`);
  const out = new Float64Array(cells);
  addLocalVariation(current, shape, periodic, 1, out);
  addLocalVariation(previous, shape, periodic, -1, out);
  return out;
}

export interface Plane {
  values: ArrayLike<number>;
  rows: number;
  cols: number;
  /** 3D: the index along the slowest axis that was cut. */
  slice?: number;
}

/**
 * The 2D plane to draw of a 1D, 2D or 3D field: 1D as one row, 2D as is, 3D the plane at index
 * `slice` of the slowest axis (a view, not a copy, when the input is a typed array).
 */
export function planeOf(values: ArrayLike<number>, shape: readonly number[], slice = 0): Plane {
  if (shape.length === 1) return { values, rows: 1, cols: shape[0]! };
  const rows = shape[shape.length - 2]!;
  const cols = shape[shape.length - 1]!;
  if (shape.length === 2) return { values, rows, cols };
  const depth = shape[0]!;
  if (!Number.isInteger(slice) || slice < 0 || slice >= depth)
    throw new RangeError(`slice ${slice} is outside 0-${depth - 1}`);
  const start = slice * rows * cols;
  const end = start + rows * cols;
  const view = ArrayBuffer.isView(values)
    ? (values as unknown as Float64Array).subarray(start, end)
    : Array.prototype.slice.call(values, start, end);
  return { values: view as ArrayLike<number>, rows, cols, slice };
}

/** Sum and largest magnitude of finite entries (NaN and infinities are skipped). */
export function growthStats(values: ArrayLike<number>): { total: number; peak: number } {
  let total = 0;
  let peak = 0;
  for (let i = 0; i < values.length; i++) {
    const v = values[i]!;
    if (!Number.isFinite(v)) continue;
    total += v;
    const a = v < 0 ? -v : v;
    if (a > peak) peak = a;
  }
  return { total, peak };
}
