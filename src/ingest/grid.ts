import type { GridAxis } from '@/src/analysis/types';

/**
 * Small pure helpers to build grid axes and to find cells by coordinate. Coordinates read from
 * text are compared exactly: the same decimal text always parses to the same double, and a
 * solver writes the same cell centre the same way at every step.
 */

/** Relative tolerance under which cell widths count as uniform (round-off of printed centres). */
const UNIFORM_TOLERANCE = 1e-9;

/** Sorted distinct values of `values[0..count)`; NaN must have been refused before. */
export function distinctSorted(values: Float64Array, count: number): Float64Array {
  const sorted = values.slice(0, count).sort();
  let n = 0;
  for (let i = 0; i < sorted.length; i++) {
    const v = sorted[i] as number;
    if (n === 0 || v !== sorted[n - 1]) sorted[n++] = v;
  }
  return sorted.slice(0, n);
}

/** Index of `value` in the strictly increasing `axis`, or -1. */
export function findCoordinate(axis: Float64Array, value: number): number {
  let lo = 0;
  let hi = axis.length - 1;
  while (lo <= hi) {
    const mid = (lo + hi) >>> 1;
    const v = axis[mid] as number;
    if (v < value) lo = mid + 1;
    else if (v > value) hi = mid - 1;
    else return mid;
  }
  return -1;
}

/** The common width when centres are evenly spaced (to round-off), else undefined. */
export function uniformSpacing(coordinates: Float64Array): number | undefined {
  const n = coordinates.length;
  if (n < 2) return undefined;
  const first = coordinates[0] as number;
  const last = coordinates[n - 1] as number;
  const width = (last - first) / (n - 1);
  if (!(width > 0) || !Number.isFinite(width)) return undefined;
  for (let i = 1; i < n; i++) {
    const w = (coordinates[i] as number) - (coordinates[i - 1] as number);
    if (Math.abs(w - width) > UNIFORM_TOLERANCE * Math.max(width, Math.abs(first), Math.abs(last))) {
      return undefined;
    }
  }
  return width;
}

/** An axis with its cell-centre coordinates (and the spacing too when it is uniform). */
export function axisFromCoordinates(name: string, coordinates: Float64Array, periodic: boolean): GridAxis {
  const axis: GridAxis = { name, size: coordinates.length, periodic, coordinates };
  const spacing = uniformSpacing(coordinates);
  if (spacing !== undefined) axis.spacing = spacing;
  return axis;
}

/** First index where `values` fails to increase strictly, or -1. */
export function firstNonIncreasing(values: ArrayLike<number>): number {
  for (let i = 1; i < values.length; i++) {
    if (!((values[i] as number) > (values[i - 1] as number))) return i;
  }
  return -1;
}

/** `(x=0.105, y=2)`: a cell named by the coordinates as written. */
export function describeCell(names: readonly string[], texts: readonly string[]): string {
  return `(${names.map((n, i) => `${n}=${(texts[i] ?? '').trim()}`).join(', ')})`;
}
