/**
 * Strict local extrema with a noise floor. A difference of at most `floor` counts as zero, so
 * round-off cannot create extrema; a plateau (cells joined by such differences) counts once.
 *
 * 1D: a cell or plateau is a strict local maximum when the nearest differences on both sides that
 * exceed the floor point down from it, a minimum when both point up. The count equals the number
 * of sign changes in the sequence of signs of the differences, with differences below the floor
 * dropped. Cells at the ends of a non-periodic line, and plateaus touching them, have a neighbour
 * on one side only and are never counted; on a periodic line the sequence is cyclic.
 *
 * 2D/3D: a cell is compared with its axis neighbours (2 per axis). Cells joined by differences of
 * at most `floor` belong to the same plateau (connected component). A plateau is a strict maximum
 * when every difference leaving it (to a cell outside the plateau) goes down by more than
 * `floor`, there is at least one, and no member lies on a non-periodic boundary; minima likewise.
 * Differences between two members are ignored even when larger than the floor: a plateau that
 * creeps up a slope in steps below the floor is still one flat region, exactly as a run of
 * sub-floor differences is on a 1D line (without this, a large flat background with sub-floor
 * tails would flip between "minimum" and "not" from step to step). On a one-dimensional grid this
 * agrees with the 1D rule. Axes of size 1 have no neighbours and are ignored.
 *
 * Differences involving NaN count as within the floor (flat); the analyser reports non-finite
 * values separately.
 *
 * References: Harten 1983, "High resolution schemes for hyperbolic conservation laws"
 * (monotonicity, local extrema); Hoshen & Kopelman 1976, "Percolation and cluster distribution. I.
 * Cluster multiple labeling technique and critical concentration algorithm" (one-pass labelling
 * of connected cells with union-find).
 */
import { gridLayout } from './grid';
import type { Grid } from './types';

/**
 * Number of strict local extrema of one line of `n` values at `offset + k * stride`, with
 * differences of at most `floor` counted as zero (rule: file comment). Empty input, one value,
 * all-equal values and any line without a significant sign change give 0.
 *
 * References: Harten 1983, "High resolution schemes for hyperbolic conservation laws".
 */
export function countExtremaStrided(
  n: number,
  x: ArrayLike<number>,
  stride: number,
  offset: number,
  periodic: boolean,
  floor = 0,
): number {
  if (n < 2) return 0;
  let count = 0;
  let firstSign = 0;
  let lastSign = 0;
  const edges = periodic ? n : n - 1;
  for (let e = 0; e < edges; e++) {
    const i = offset + e * stride;
    const j = e === n - 1 ? offset : i + stride;
    const d = x[j]! - x[i]!;
    const sign = d > floor ? 1 : d < -floor ? -1 : 0;
    if (sign === 0) continue;
    if (lastSign !== 0 && sign !== lastSign) count++;
    if (firstSign === 0) firstSign = sign;
    lastSign = sign;
  }
  // Closing the cycle: the last significant sign meets the first one again.
  if (periodic && firstSign !== 0 && lastSign !== firstSign) count++;
  return count;
}

export interface ExtremaOptions {
  /** Differences of at most this size count as zero (default 0: exact comparison). */
  floor?: number;
  /** Without a grid: whether the line wraps round. With a grid: per-axis overrides by name. */
  periodic?: boolean | Record<string, boolean>;
}

// Bits of a cell or plateau: some neighbour significantly higher / lower; on a non-periodic end;
// (MEMBER) the cell belongs to a plateau.
const HIGHER = 1;
const LOWER = 2;
const TOUCHES = 4;
const MEMBER = 8;

/**
 * 1 per maximum and 1 per minimum that a plateau with these bits is: a maximum has a lower
 * neighbour, no higher one and does not touch a non-periodic end; a minimum the reverse.
 *
 * References: Harten 1983, "High resolution schemes for hyperbolic conservation laws".
 */
export function extremaOfPlateau(bits: number): number {
  const isMax = (bits & (HIGHER | TOUCHES)) === 0 && (bits & LOWER) !== 0 ? 1 : 0;
  const isMin = (bits & (LOWER | TOUCHES)) === 0 && (bits & HIGHER) !== 0 ? 1 : 0;
  return isMax + isMin;
}

export const PLATEAU_BITS = { HIGHER, LOWER, TOUCHES, MEMBER } as const;

/**
 * Number of strict local extrema of `values` on `grid` (row-major, last axis fastest), each cell
 * compared with its axis neighbours, plateaus within `floor` counted once (rule: file comment).
 * Without a grid the values are one line. Empty input, one cell and all-equal values give 0.
 *
 * This is the plain reference form (two sweeps, small arrays per cell), meant for tests and small
 * grids; the analyser counts in its single sweep (kernels.ts) and is tested against this.
 *
 * References: Harten 1983, "High resolution schemes for hyperbolic conservation laws"; Hoshen &
 * Kopelman 1976, "Percolation and cluster distribution. I. Cluster multiple labeling technique
 * and critical concentration algorithm".
 */
export function countExtrema(values: ArrayLike<number>, grid?: Grid, options: ExtremaOptions = {}): number {
  const floor = options.floor ?? 0;
  if (grid === undefined) {
    return countExtremaStrided(values.length, values, 1, 0, options.periodic === true, floor);
  }
  const overrides = typeof options.periodic === 'object' ? options.periodic : undefined;
  const { shape, strides, periodic, cells } = gridLayout(grid, { periodic: overrides });
  if (values.length !== cells) {
    throw new RangeError(`values has ${values.length} entries, the grid ${cells} cells`);
  }
  const parent = new Int32Array(cells).fill(-1);
  const find = (c: number): number => {
    let r = c;
    while (parent[r] !== r) {
      parent[r] = parent[parent[r]!]!; // path halving keeps the trees flat
      r = parent[r]!;
    }
    return r;
  };
  // Neighbours of a cell along every axis of size >= 2; -1 past a non-periodic end.
  const neighbours = (c: number, coord: readonly number[]): number[] => {
    const out: number[] = [];
    for (let k = 0; k < shape.length; k++) {
      const size = shape[k]!;
      if (size < 2) continue;
      const pos = coord[k]!;
      const stride = strides[k]!;
      out.push(pos > 0 ? c - stride : periodic[k] ? c + (size - 1) * stride : -1);
      out.push(pos < size - 1 ? c + stride : periodic[k] ? c - (size - 1) * stride : -1);
    }
    return out;
  };
  const flat = (a: number, b: number): boolean => {
    const d = values[b]! - values[a]!;
    return !(d > floor || d < -floor);
  };
  // Phase 1: join every pair of neighbours within the floor.
  const coord = new Array<number>(shape.length).fill(0);
  for (let c = 0; c < cells; c++) {
    for (const nb of neighbours(c, coord)) {
      if (nb < 0 || !flat(c, nb)) continue;
      if (parent[c]! < 0) parent[c] = c;
      if (parent[nb]! < 0) parent[nb] = nb;
      const a = find(c);
      const b = find(nb);
      if (a !== b) parent[b] = a;
    }
    advance(coord, shape);
  }
  // Phase 2: mark each plateau (or single cell) by the differences that leave it.
  const bits = new Uint8Array(cells);
  const rootOf = (c: number): number => (parent[c]! < 0 ? c : find(c));
  coord.fill(0);
  for (let c = 0; c < cells; c++) {
    const root = rootOf(c);
    for (const nb of neighbours(c, coord)) {
      if (nb < 0) {
        bits[root] = bits[root]! | TOUCHES;
        continue;
      }
      if (flat(c, nb) || rootOf(nb) === root) continue;
      bits[root] = bits[root]! | (values[nb]! > values[c]! ? HIGHER : LOWER);
    }
    advance(coord, shape);
  }
  let count = 0;
  for (let c = 0; c < cells; c++) if (rootOf(c) === c) count += extremaOfPlateau(bits[c]!);
  return count;
}

/** Steps a row-major multi-index by one cell. */
function advance(coord: number[], shape: readonly number[]): void {
  for (let k = shape.length - 1; k >= 0; k--) {
    coord[k] = coord[k]! + 1;
    if (coord[k]! < shape[k]!) return;
    coord[k] = 0;
  }
}
