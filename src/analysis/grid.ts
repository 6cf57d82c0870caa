/**
 * Layout helpers for the structured grids of types.ts: strides of the row-major layout, which
 * axes wrap round, cell centres and cell widths. Small and allocation-light; the analyser calls
 * them once per variable, never per cell.
 */
import type { Grid, GridAxis, VariableOptions } from './types';

export interface GridLayout {
  /** Axis sizes, slowest first. */
  shape: number[];
  /** Distance in the flat array between neighbours along each axis (last axis: 1). */
  strides: number[];
  /** Whether each axis wraps round, after the variable's `options.periodic` overrides. */
  periodic: boolean[];
  cells: number;
}

/**
 * Strides, periodicity and cell count of a grid, with per-variable periodic overrides applied:
 * stride_k = product of the sizes of the axes after k; cells = product of all sizes.
 *
 * References: none (the row-major layout convention of types.ts).
 */
export function gridLayout(grid: Grid, options?: VariableOptions): GridLayout {
  const shape = grid.axes.map((axis) => checkedSize(axis));
  const strides = new Array<number>(shape.length).fill(1);
  for (let k = shape.length - 2; k >= 0; k--) strides[k] = strides[k + 1]! * shape[k + 1]!;
  const periodic = grid.axes.map((axis) => options?.periodic?.[axis.name] ?? axis.periodic);
  let cells = 1;
  for (const size of shape) cells *= size;
  return { shape, strides, periodic, cells };
}

function checkedSize(axis: GridAxis): number {
  if (!Number.isInteger(axis.size) || axis.size < 0) {
    throw new RangeError(`axis "${axis.name}": size must be a non-negative integer`);
  }
  return axis.size;
}

/**
 * Spacing of a uniform axis (default 1); rejects non-positive or non-finite spacing.
 *
 * References: none (the row-major layout convention of types.ts).
 */
export function axisSpacing(axis: GridAxis): number {
  const h = axis.spacing ?? 1;
  if (!(h > 0) || !Number.isFinite(h)) {
    throw new RangeError(`axis "${axis.name}": spacing must be a positive finite number`);
  }
  return h;
}

/**
 * Cell-centre coordinate of cell i: `coordinates[i]` when given, else (i + 1/2) * spacing (the
 * convention of types.ts).
 *
 * References: none (the grid convention of types.ts).
 */
export function axisCentre(axis: GridAxis, i: number): number {
  if (axis.coordinates !== undefined) return axis.coordinates[i] ?? Number.NaN;
  return (i + 0.5) * axisSpacing(axis);
}

/**
 * Widths of the cells of one axis. Uniform axes: `spacing` (default 1). With coordinates x_i the
 * cell faces sit halfway between neighbouring centres and the end faces mirror the nearest
 * interior face, so w_0 = x_1 - x_0, w_i = (x_{i+1} - x_{i-1}) / 2, w_{n-1} = x_{n-1} - x_{n-2};
 * a single cell gets the spacing (default 1). The widths add up to the distance between the two
 * end faces, so sum(phi * w) is the midpoint-rule integral of phi.
 *
 * References: LeVeque 2002, "Finite Volume Methods for Hyperbolic Problems" (cell averages on
 * non-uniform grids, chapter 6).
 */
export function axisWidths(axis: GridAxis): Float64Array {
  const n = checkedSize(axis);
  const x = axis.coordinates;
  if (x === undefined || n < 2) return new Float64Array(n).fill(axisSpacing(axis));
  if (x.length !== n) {
    throw new RangeError(`axis "${axis.name}": ${x.length} coordinates for ${n} cells`);
  }
  const widths = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const left = i === 0 ? x[1]! - x[0]! : x[i]! - x[i - 1]!;
    const right = i === n - 1 ? x[n - 1]! - x[n - 2]! : x[i + 1]! - x[i]!;
    if (!(left > 0) || !(right > 0)) {
      throw new RangeError(`axis "${axis.name}": coordinates must be strictly increasing`);
    }
    widths[i] = 0.5 * (left + right);
  }
  return widths;
}

/**
 * How the analyser weights a cell in the conservation sum: a single number when every cell has
 * the same size (options.cellSize, or no axis has coordinates), else one width array per axis
 * whose product is the cell size.
 */
export type CellSizes = { uniform: number } | { widths: Float64Array[] };

/**
 * Cell sizes for the conservation sum: options.cellSize when given; else the product of the
 * spacings when no axis has coordinates; else the per-axis widths of `axisWidths`, whose product
 * is V_c = w_x(i) w_y(j) w_z(k).
 *
 * References: LeVeque 2002, "Finite Volume Methods for Hyperbolic Problems" (cell averages and
 * cell sizes, chapter 4).
 */
export function cellSizes(grid: Grid, options?: VariableOptions): CellSizes {
  if (options?.cellSize !== undefined) {
    if (!(options.cellSize > 0) || !Number.isFinite(options.cellSize)) {
      throw new RangeError('options.cellSize must be a positive finite number');
    }
    return { uniform: options.cellSize };
  }
  if (grid.axes.every((axis) => axis.coordinates === undefined || axis.size < 2)) {
    let size = 1;
    for (const axis of grid.axes) size *= axisSpacing(axis);
    return { uniform: size };
  }
  return { widths: grid.axes.map((axis) => axisWidths(axis)) };
}

/**
 * Total size (length, area, volume) of the grid: V = sum of all cell sizes = product over axes of
 * the sum of the widths.
 *
 * References: none (the row-major layout convention of types.ts).
 */
export function totalCellSize(sizes: CellSizes, shape: readonly number[]): number {
  if ('uniform' in sizes) {
    let cells = 1;
    for (const s of shape) cells *= s;
    return sizes.uniform * cells;
  }
  let total = 1;
  for (const w of sizes.widths) {
    let sum = 0;
    for (let i = 0; i < w.length; i++) sum += w[i]!;
    total *= sum;
  }
  return total;
}

/**
 * Splits a flat row-major index into one index per axis (slowest first): i_k = floor(c / stride_k)
 * mod size_k.
 *
 * References: none (the row-major layout convention of types.ts).
 */
export function unravelIndex(index: number, shape: readonly number[]): number[] {
  const out = new Array<number>(shape.length).fill(0);
  let rest = index;
  for (let k = shape.length - 1; k >= 0; k--) {
    const size = shape[k]!;
    out[k] = size > 0 ? rest % size : 0;
    rest = size > 0 ? Math.floor(rest / size) : 0;
  }
  return out;
}
