/**
 * Total variation of a field on a structured grid, the quantity a TVD scheme must not increase:
 *   TV(phi) = sum over axes, sum over lines along the axis, sum_i |phi_{i+1} - phi_i|,
 * with the wrap-around term |phi_0 - phi_{n-1}| on periodic axes. Terms are accumulated with
 * Neumaier's compensated summation, so the result is within a few ulps of the exact total
 * variation of the stored values (each difference is rounded once, relative error <= u, and the
 * sum adds at most 2u; see summation.ts).
 *
 * These are the reference routines; the analyser computes the same sum inside its single pass.
 */
import { gridLayout } from './grid';
import type { Grid } from './types';

/**
 * Total variation of one line of `n` values read at `offset + k * stride`:
 * sum_{k=0}^{n-2} |x_{k+1} - x_k|, plus |x_0 - x_{n-1}| when `periodic`. Empty and one-value
 * lines give 0 (a one-cell periodic line's wrap term is |x_0 - x_0| = 0); all-equal values
 * give 0; a NaN makes the result NaN.
 *
 * References: Harten 1983, "High resolution schemes for hyperbolic conservation laws" (J.
 * Comput. Phys. 49); Neumaier 1974, "Rundungsfehleranalyse einiger Verfahren zur Summation
 * endlicher Summen".
 */
export function totalVariationStrided(
  n: number,
  x: ArrayLike<number>,
  stride: number,
  offset: number,
  periodic: boolean,
): number {
  const acc = { sum: 0, carry: 0 };
  addLine(acc, n, x, stride, offset, periodic);
  return acc.sum + acc.carry;
}

interface Accumulator {
  sum: number;
  carry: number;
}

function addLine(
  acc: Accumulator,
  n: number,
  x: ArrayLike<number>,
  stride: number,
  offset: number,
  periodic: boolean,
): void {
  if (n < 2) return;
  const edges = n - 1;
  // Four lanes over four contiguous quarters of the line: independent Neumaier chains that the
  // processor can run side by side (one chain is bound by the latency of its additions).
  const quarter = Math.floor(edges / 4);
  let s0 = 0;
  let s1 = 0;
  let s2 = 0;
  let s3 = 0;
  let c0 = 0;
  let c1 = 0;
  let c2 = 0;
  let c3 = 0;
  if (quarter > 0) {
    const step = stride;
    let i0 = offset;
    let i1 = offset + quarter * step;
    let i2 = offset + 2 * quarter * step;
    let i3 = offset + 3 * quarter * step;
    let p0 = x[i0]!;
    let p1 = x[i1]!;
    let p2 = x[i2]!;
    let p3 = x[i3]!;
    for (let k = 0; k < quarter; k++) {
      i0 += step;
      i1 += step;
      i2 += step;
      i3 += step;
      const v0 = x[i0]!;
      const v1 = x[i1]!;
      const v2 = x[i2]!;
      const v3 = x[i3]!;
      const t0 = Math.abs(v0 - p0);
      const t1 = Math.abs(v1 - p1);
      const t2 = Math.abs(v2 - p2);
      const t3 = Math.abs(v3 - p3);
      p0 = v0;
      p1 = v1;
      p2 = v2;
      p3 = v3;
      // Terms and sums are non-negative, so comparing them compares their magnitudes.
      let t = s0 + t0;
      c0 += s0 >= t0 ? s0 - t + t0 : t0 - t + s0;
      s0 = t;
      t = s1 + t1;
      c1 += s1 >= t1 ? s1 - t + t1 : t1 - t + s1;
      s1 = t;
      t = s2 + t2;
      c2 += s2 >= t2 ? s2 - t + t2 : t2 - t + s2;
      s2 = t;
      t = s3 + t3;
      c3 += s3 >= t3 ? s3 - t + t3 : t3 - t + s3;
      s3 = t;
    }
  }
  // Edges the quarters did not cover, then the wrap-around term.
  let prev = x[offset + 4 * quarter * stride]!;
  for (let e = 4 * quarter; e < edges; e++) {
    const v = x[offset + (e + 1) * stride]!;
    const t0 = Math.abs(v - prev);
    const t = s0 + t0;
    c0 += s0 >= t0 ? s0 - t + t0 : t0 - t + s0;
    s0 = t;
    prev = v;
  }
  if (periodic) {
    const t0 = Math.abs(x[offset]! - prev);
    const t = s0 + t0;
    c0 += s0 >= t0 ? s0 - t + t0 : t0 - t + s0;
    s0 = t;
  }
  for (const part of [s0, s1, s2, s3, c0, c1, c2, c3]) addTo(acc, part);
}

/** Neumaier step of the accumulator (terms may have either sign here: carries can be negative). */
function addTo(acc: Accumulator, term: number): void {
  const t = acc.sum + term;
  if (Math.abs(acc.sum) >= Math.abs(term)) acc.carry += acc.sum - t + term;
  else acc.carry += term - t + acc.sum;
  acc.sum = t;
}

export interface TotalVariationOptions {
  /**
   * Without a grid: whether the 1D data wrap round (default false). With a grid: per-axis
   * overrides of `GridAxis.periodic`, keyed by axis name.
   */
  periodic?: boolean | Record<string, boolean>;
}

/**
 * Total variation of `values` summed over every axis of `grid` (row-major, last axis fastest),
 * with wrap-around terms on periodic axes; without a grid the values are one non-periodic line
 * (or periodic with `options.periodic = true`). Formula and accuracy: see the file comment.
 * Empty input, one cell and all-equal values give 0; NaN gives NaN.
 *
 * References: Harten 1983, "High resolution schemes for hyperbolic conservation laws";
 * Goodman & LeVeque 1985, "On the accuracy of stable schemes for 2D scalar conservation laws"
 * (total variation in several dimensions as the sum over axes); Neumaier 1974,
 * "Rundungsfehleranalyse einiger Verfahren zur Summation endlicher Summen".
 */
export function totalVariation(values: ArrayLike<number>, grid?: Grid, options: TotalVariationOptions = {}): number {
  if (grid === undefined) {
    return totalVariationStrided(values.length, values, 1, 0, options.periodic === true);
  }
  const overrides = typeof options.periodic === 'object' ? options.periodic : undefined;
  const layout = gridLayout(grid, { periodic: overrides });
  if (values.length !== layout.cells) {
    throw new RangeError(`values has ${values.length} entries, the grid ${layout.cells} cells`);
  }
  const acc = { sum: 0, carry: 0 };
  for (let k = 0; k < layout.shape.length; k++) {
    const size = layout.shape[k]!;
    const stride = layout.strides[k]!;
    const block = size * stride;
    if (block === 0) continue;
    for (let outer = 0; outer < layout.cells; outer += block) {
      for (let inner = 0; inner < stride; inner++) {
        addLine(acc, size, values, stride, outer + inner, layout.periodic[k]!);
      }
    }
  }
  return acc.sum + acc.carry;
}
