/**
 * Compensated summation. Plain left-to-right summation of m terms can lose up to (m - 1) u of
 * the sum of the terms' magnitudes; Neumaier's variant of Kahan's method carries the rounding
 * error of each addition in a second accumulator and adds it back at the end, which makes the
 * error bound independent of m to first order:
 *   |S_computed - S| <= 2u |S| + O(m u^2) sum |x_i|      (u = 2^-53 in float64)
 * It also stays correct when a term is larger than the running sum, which Kahan's method does
 * not. The analyser inlines the same two lines in its loops; this file is the reference form.
 *
 * References: Neumaier 1974, "Rundungsfehleranalyse einiger Verfahren zur Summation endlicher
 * Summen" (ZAMM 54); Higham 2002, "Accuracy and Stability of Numerical Algorithms", 2nd ed.,
 * section 4.3.
 */

/**
 * Neumaier-compensated sum of `n` values of `x` taken at `offset + k * stride`.
 * Empty input sums to 0. NaN or an infinity among the terms makes the result NaN or infinite, as
 * in plain summation.
 *
 * References: Neumaier 1974, "Rundungsfehleranalyse einiger Verfahren zur Summation endlicher
 * Summen"; Higham 2002, "Accuracy and Stability of Numerical Algorithms", section 4.3.
 */
export function sumCompensatedStrided(n: number, x: ArrayLike<number>, stride: number, offset: number): number {
  let sum = 0;
  let carry = 0;
  for (let k = 0, i = offset; k < n; k++, i += stride) {
    const term = x[i]!;
    const t = sum + term;
    // The smaller operand is the one whose low bits the addition dropped.
    if (Math.abs(sum) >= Math.abs(term)) carry += sum - t + term;
    else carry += term - t + sum;
    sum = t;
  }
  return sum + carry;
}

/**
 * Neumaier-compensated sum of every element of `x`. Formula and bound: see the file comment.
 *
 * References: Neumaier 1974, "Rundungsfehleranalyse einiger Verfahren zur Summation endlicher
 * Summen"; Higham 2002, "Accuracy and Stability of Numerical Algorithms", section 4.3.
 */
export function sumCompensated(x: ArrayLike<number>): number {
  return sumCompensatedStrided(x.length, x, 1, 0);
}
