/**
 * The shapes every part of Varigate agrees on: a structured grid, a variable on it, and one
 * stored time level (step) of that variable. Readers in src/ingest produce these; the analyser
 * in src/analysis consumes them; nothing here knows about files, HTTP or the database.
 *
 * Memory layout: values are stored row-major with the LAST axis varying fastest, exactly like a
 * C array `values[z][y][x]` (HDF5 and NetCDF use the same order). `grid.axes[0]` is the slowest
 * axis; a 1D grid has one axis, a 2D grid `[y, x]`, a 3D grid `[z, y, x]`.
 */

export type FieldArray = Float64Array | Float32Array;

export interface GridAxis {
  /** Axis name as written in the input (`x`, `y`, `z`, or a manifest-given name). */
  name: string;
  /** Number of cells along the axis (>= 1). */
  size: number;
  /** True when the last cell neighbours the first (wrap-around difference counts in TV). */
  periodic: boolean;
  /**
   * Cell-centre coordinates, length `size`, strictly increasing, when the input gives them.
   * When absent the axis is uniform with `spacing` and the first centre at `spacing / 2`.
   */
  coordinates?: Float64Array;
  /** Uniform cell width; used when `coordinates` is absent. Defaults to 1. */
  spacing?: number;
}

export interface Grid {
  /** Slowest axis first; 1 to 3 axes. */
  axes: GridAxis[];
}

/**
 * How precisely the numbers were stored. It bounds what differences the data can resolve, which
 * is what the noise floor is built from.
 * - `float32` / `float64`: binary storage (HDF5, or a typed array written by a tool).
 * - `decimal`: text with at most `significantDigits` significant decimal digits per value.
 */
export type Precision = { kind: 'float32' } | { kind: 'float64' } | { kind: 'decimal'; significantDigits: number };

/** Options a CI upload's manifest (or a case's policy) gives for one variable. */
export interface VariableOptions {
  /** Overrides `GridAxis.periodic` per axis name. */
  periodic?: Record<string, boolean>;
  /** Uniform cell size (product of widths) used for conservation sums; overrides the grid's. */
  cellSize?: number;
  /** Physical bounds the variable must respect (e.g. 0..1 for a mass fraction). */
  bounds?: { lower?: number; upper?: number };
  /** Sign of the advecting velocity along the fastest axis (+1 flows towards larger x). */
  velocitySign?: 1 | -1;
  /** A variable of a nonlinear system (Euler density, pressure) where small TV growth is expected. */
  system?: boolean;
  /** False for variables whose sum is not conserved; turns conservation drift off. */
  conservative?: boolean;
}

export interface VariableInfo {
  name: string;
  grid: Grid;
  precision: Precision;
  options?: VariableOptions;
}

/** One stored time level of one variable. `values.length` equals the product of the axis sizes. */
export interface Step {
  /** Step number as written by the solver (not necessarily 0, 1, 2...; strictly increasing). */
  index: number;
  /** Simulation time of the step; NaN when the input does not give one. */
  time: number;
  values: FieldArray;
}

/** Number of cells of a grid: the product of its axis sizes. */
export function cellCount(grid: Grid): number {
  let n = 1;
  for (const axis of grid.axes) n *= axis.size;
  return n;
}
