/**
 * Noise floor: the smallest differences, total-variation changes and mass changes that the stored
 * data can resolve. Below it a difference may be an artefact of rounding (in the solver's last
 * update or in storage), so Varigate counts it as zero and never raises a finding for it.
 *
 * Model (Higham 2002, section 2.1): storing a real x rounds it to x~ = x (1 + d), |d| <= u, where
 * u is the unit roundoff of the storage: 2^-24 for float32, 2^-53 for float64, and for decimal
 * text with D significant digits half a unit in the last digit, u = 0.5 * 10^(1 - D).
 * On top, the solver's own last update rounds a handful of operations on values no larger than
 * the data magnitude M; we allow SOLVER_OPERATIONS = 4 of them in float64 (common practice: a
 * flux-form update u - c (F+ - F-) rounds about four operations). Each stored value is therefore
 * within
 *     eta = (u / (1 - u) + 4 u64) M                                          (per-value error)
 * of the value exact arithmetic would have produced, with M = max |phi| of the variable over the
 * steps seen so far, the current one included (|x| <= |x~| / (1 - u) turns the bound relative to
 * the unknown exact x into one relative to the stored x~).
 *
 * Differences: two values each within eta differ from their exact difference by at most 2 eta,
 * so a difference |x_j - x_i| <= 2 eta cannot be told from zero:
 *     valueFloor = 2 eta = 2 (u / (1 - u) + 4 u64) M.
 * The analyser uses it for extrema (a smaller difference counts as flat) and for bounds (a value
 * counts as outside only when it is more than valueFloor outside).
 *
 * Total variation: TV~ - TV = sum over edges e=(i,j) of |x~_j - x~_i| - |x_j - x_i|. Write
 * d_c = x~_c - x_c for the per-value errors. On an edge whose stored difference exceeds
 * valueFloor the sign is certain, so its error is exactly s_e (d_j - d_i) with s_e = +-1; along a
 * run of edges with the same sign these terms telescope and only the run's two end cells remain.
 * An edge below the floor can err by at most |d_i| + |d_j|. Hence
 *     |TV~ - TV| <= sum_c |d_c| w_c,
 *     w_c = sum over the axes of |s_in - s_out| + [in-edge below floor] + [out-edge below floor],
 * where s_in, s_out are the signs (+1, -1, or 0 below the floor) of the edges entering and leaving
 * c along that axis (a missing edge at a non-periodic end has sign 0 and is not "below floor").
 * w_c is 0 inside monotone runs, so the bound grows with the number of run ends, extrema and
 * near-flat edges — not with the number of cells, which a worst-case bound m u M would do.
 * With |d_c| <= u |x~_c| / (1 - u) for binary storage (the relative model is exact per value),
 * and |d_c| <= u M for decimal text (fixed-point writers round small numbers to an absolute, not
 * relative, precision), plus the solver allowance 4 u64 M per value, the TV noise of one step is
 *     tvNoise = u A / (1 - u) + 4 u64 M W + 3 u64 TV           (binary storage)
 *     tvNoise = (u / (1 - u) + 4 u64) M W + 3 u64 TV            (decimal text)
 *     A = sum_c |x~_c| w_c,   W = sum_c w_c,
 * where the last term bounds Varigate's own float64 arithmetic: each difference is rounded once
 * (u64 TV) and Neumaier summation adds at most 2 u64 TV (Higham 2002, section 4.3). The floor
 * for the TV change between steps n-1 and n is tvNoise_{n-1} + tvNoise_n. This a-posteriori
 * bound is our own derivation from Higham's rounding model; tests check it on perturbed data.
 *
 * Mass (sum of phi times cell size V_c): the per-value errors add up to at most
 *     massNoise = u L1 / (1 - u) + 4 u64 M V + 3 u64 L1      (binary; decimal text uses
 *                                                               u M V / (1 - u) as first term)
 * with L1 = sum |x~_c| V_c and V = sum V_c; the last term covers the rounded products and the
 * compensated sum. Drift below massNoise_0 + massNoise_n is never a finding.
 *
 * References: Higham 2002, "Accuracy and Stability of Numerical Algorithms", 2nd ed., sections
 * 2.1-2.2 (rounding model) and 4.3 (summation); IEEE 754-2019, "IEEE Standard for
 * Floating-Point Arithmetic" (binary32 and binary64 precisions).
 */
import type { Precision } from './types';

/** Unit roundoff of IEEE binary64. */
export const UNIT_ROUNDOFF_FLOAT64 = 2 ** -53;
/** Unit roundoff of IEEE binary32. */
export const UNIT_ROUNDOFF_FLOAT32 = 2 ** -24;
/** Rounded operations of the solver's last update that the per-value error allows for. */
export const SOLVER_OPERATIONS = 4;

/**
 * Unit roundoff u of the stored data: 2^-24 (float32), 2^-53 (float64), 0.5 * 10^(1 - D) for
 * decimal text with D significant digits (D from `significantDigits` when given, which a reader
 * sets per step, else from the precision).
 *
 * References: Higham 2002, "Accuracy and Stability of Numerical Algorithms", section 2.1;
 * IEEE 754-2019, "IEEE Standard for Floating-Point Arithmetic".
 */
export function unitRoundoff(precision: Precision, significantDigits?: number): number {
  switch (precision.kind) {
    case 'float32':
      return UNIT_ROUNDOFF_FLOAT32;
    case 'float64':
      return UNIT_ROUNDOFF_FLOAT64;
    case 'decimal': {
      const digits = significantDigits ?? precision.significantDigits;
      if (!Number.isInteger(digits) || digits < 1) {
        throw new RangeError('significant digits must be an integer >= 1');
      }
      // Below float64's own resolution a decimal string carries no more information.
      return Math.max(0.5 * 10 ** (1 - digits), UNIT_ROUNDOFF_FLOAT64);
    }
    default:
      throw new RangeError(`unknown precision kind "${String((precision as { kind: unknown }).kind)}"`);
  }
}

/**
 * True for binary storage, where the rounding error of a value is relative to that value.
 *
 * References: Higham 2002, "Accuracy and Stability of Numerical Algorithms", section 2.1.
 */
export function isBinary(precision: Precision): boolean {
  return precision.kind !== 'decimal';
}

/**
 * Per-value error bound eta = (u / (1 - u) + 4 u64) M: storage rounding plus the solver's last
 * update.
 *
 * References: Higham 2002, "Accuracy and Stability of Numerical Algorithms", section 2.1.
 */
export function valueError(u: number, magnitude: number): number {
  return (u / (1 - u) + SOLVER_OPERATIONS * UNIT_ROUNDOFF_FLOAT64) * magnitude;
}

/**
 * Smallest resolvable difference between two stored values: valueFloor = 2 eta.
 *
 * References: Higham 2002, "Accuracy and Stability of Numerical Algorithms", section 2.1.
 */
export function valueFloor(u: number, magnitude: number): number {
  return 2 * valueError(u, magnitude);
}

export interface TvNoiseInput {
  /** Unit roundoff of the storage. */
  u: number;
  binary: boolean;
  /** Data magnitude M. */
  magnitude: number;
  /** W = sum of the per-cell weights w_c (see the file comment). */
  weight: number;
  /** A = sum of |x_c| w_c. */
  weightedMagnitude: number;
  /** The computed total variation of the step. */
  tv: number;
}

/**
 * Bound on the rounding error of one step's total variation (file comment for the derivation):
 * binary u A / (1 - u) + 4 u64 M W + 3 u64 TV; decimal (u / (1 - u) + 4 u64) M W + 3 u64 TV.
 *
 * References: Higham 2002, "Accuracy and Stability of Numerical Algorithms", sections 2.1 and
 * 4.3; Neumaier 1974, "Rundungsfehleranalyse einiger Verfahren zur Summation endlicher Summen".
 */
export function tvNoise(input: TvNoiseInput): number {
  const { u, binary, magnitude, weight, weightedMagnitude, tv } = input;
  const storage = ((binary ? weightedMagnitude : magnitude * weight) * u) / (1 - u);
  const solver = SOLVER_OPERATIONS * UNIT_ROUNDOFF_FLOAT64 * magnitude * weight;
  return storage + solver + 3 * UNIT_ROUNDOFF_FLOAT64 * tv;
}

export interface MassNoiseInput {
  u: number;
  binary: boolean;
  magnitude: number;
  /** L1 = sum |x_c| V_c. */
  l1: number;
  /** V = sum of the cell sizes. */
  totalSize: number;
}

/**
 * Bound on the rounding error of one step's mass sum(phi V_c): binary u L1 / (1 - u) +
 * 4 u64 M V + 3 u64 L1; decimal u M V / (1 - u) + 4 u64 M V + 3 u64 L1.
 *
 * References: Higham 2002, "Accuracy and Stability of Numerical Algorithms", sections 2.1 and
 * 4.3.
 */
export function massNoise(input: MassNoiseInput): number {
  const { u, binary, magnitude, l1, totalSize } = input;
  const storage = ((binary ? l1 : magnitude * totalSize) * u) / (1 - u);
  const solver = SOLVER_OPERATIONS * UNIT_ROUNDOFF_FLOAT64 * magnitude * totalSize;
  return storage + solver + 3 * UNIT_ROUNDOFF_FLOAT64 * l1;
}
