/**
 * Error norms of a field against a reference of the same shape (an exact solution, or a finer
 * run restricted to this grid), weighted by cell size so they approximate the continuous norms:
 *   L1 = sum |e_c| V_c,   L2 = sqrt(sum e_c^2 V_c),   Linf = max |e_c|,   e = phi - reference.
 * The sums use Neumaier compensation.
 */
import { cellSizes, type CellSizes } from './grid';
import type { Grid, VariableOptions } from './types';

export interface ErrorNorms {
  l1: number;
  l2: number;
  max: number;
  /** Flat index of the cell with the largest |error| (-1 when there are no cells). */
  maxCell: number;
  /** Cells where the value or the reference is NaN or infinite. */
  nonFinite: number;
}

export interface ErrorNormOptions {
  /** Grid for the cell sizes; without one each of the n cells has size 1/n (a unit domain). */
  grid?: Grid;
  /** cellSize override, as in the variable options. */
  options?: VariableOptions;
}

/**
 * L1, L2 and max-norm of values - reference, cell-size weighted (formulas: file comment).
 * Empty input gives all zeros; equal arrays give zeros; a NaN or infinity in either array makes
 * l1, l2 and max NaN and is counted in `nonFinite` (an error that cannot be measured is not small).
 *
 * References: LeVeque 2002, "Finite Volume Methods for Hyperbolic Problems", section 8.1 (grid
 * norms and convergence); Neumaier 1974, "Rundungsfehleranalyse einiger Verfahren zur Summation
 * endlicher Summen".
 */
export function errorNorms(
  values: ArrayLike<number>,
  reference: ArrayLike<number>,
  options: ErrorNormOptions = {},
): ErrorNorms {
  const n = values.length;
  if (reference.length !== n) {
    throw new RangeError(`reference has ${reference.length} entries, values ${n}`);
  }
  const sizes: CellSizes =
    options.grid === undefined ? { uniform: n > 0 ? 1 / n : 1 } : cellSizes(options.grid, options.options);
  const shape = options.grid === undefined ? [n] : options.grid.axes.map((a) => a.size);
  const acc: NormAccumulator = { s1: 0, c1: 0, s2: 0, c2: 0, max: 0, maxCell: n > 0 ? 0 : -1, nonFinite: 0 };
  const last = shape.length - 1;
  const rowLength = last >= 0 ? shape[last]! : 0;
  const rows = rowLength > 0 ? n / rowLength : 0;
  const coord = new Array<number>(shape.length).fill(0);
  for (let row = 0; row < rows; row++) {
    // Cell size = (product of the slow-axis widths of this row) * (width along the fast axis).
    let rowSize = 1;
    let fast: Float64Array | null = null;
    if ('uniform' in sizes) rowSize = sizes.uniform;
    else {
      for (let k = 0; k < last; k++) rowSize *= sizes.widths[k]![coord[k]!]!;
      fast = sizes.widths[last]!;
    }
    addRow(acc, values, reference, row * rowLength, rowLength, rowSize, fast);
    for (let k = last - 1; k >= 0; k--) {
      coord[k] = coord[k]! + 1;
      if (coord[k]! < shape[k]!) break;
      coord[k] = 0;
    }
  }
  const { s1, c1, s2, c2, max, maxCell, nonFinite } = acc;
  if (nonFinite > 0) return { l1: Number.NaN, l2: Number.NaN, max: Number.NaN, maxCell, nonFinite };
  return { l1: s1 + c1, l2: Math.sqrt(s2 + c2), max, maxCell, nonFinite };
}

interface NormAccumulator {
  s1: number;
  c1: number;
  s2: number;
  c2: number;
  max: number;
  maxCell: number;
  nonFinite: number;
}

/** Adds one row of the fastest axis; `fast` holds its widths (null: uniform, size rowSize). */
function addRow(
  acc: NormAccumulator,
  values: ArrayLike<number>,
  reference: ArrayLike<number>,
  start: number,
  length: number,
  rowSize: number,
  fast: Float64Array | null,
): void {
  let { s1, c1, s2, c2, max, maxCell, nonFinite } = acc;
  for (let j = 0; j < length; j++) {
    const i = start + j;
    const e = values[i]! - reference[i]!;
    if (!Number.isFinite(e)) {
      nonFinite++;
      continue;
    }
    const a = Math.abs(e);
    const v = fast === null ? rowSize : rowSize * fast[j]!;
    const t1 = a * v;
    const n1 = s1 + t1;
    c1 += s1 >= t1 ? s1 - n1 + t1 : t1 - n1 + s1;
    s1 = n1;
    const t2 = e * e * v;
    const n2 = s2 + t2;
    c2 += s2 >= t2 ? s2 - n2 + t2 : t2 - n2 + s2;
    s2 = n2;
    if (a > max) {
      max = a;
      maxCell = i;
    }
  }
  Object.assign(acc, { s1, c1, s2, c2, max, maxCell, nonFinite });
}

/**
 * Observed order of convergence from the errors on two grids whose cell sizes differ by
 * `refinement`: p = log(errorCoarse / errorFine) / log(refinement). A scheme of order p has
 * error ~ C h^p, so halving h divides the error by 2^p.
 *
 * References: LeVeque 2002, "Finite Volume Methods for Hyperbolic Problems", section 8.1;
 * Roache 1998, "Verification and Validation in Computational Science and Engineering".
 */
export function observedOrder(errorCoarse: number, errorFine: number, refinement = 2): number {
  return Math.log(errorCoarse / errorFine) / Math.log(refinement);
}
