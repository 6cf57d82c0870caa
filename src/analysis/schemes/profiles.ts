/**
 * Initial profiles for the reference schemes. Cell i of `cells` has its centre at
 * x_i = (i + 1/2) / cells on the unit interval.
 */

/**
 * A top hat: `high` on the `width` cells starting at `start` (wrapping round the end of the
 * periodic domain), `low` elsewhere. The two discontinuities are the classic test of whether a
 * scheme creates oscillations.
 *
 * References: LeVeque 2002, "Finite Volume Methods for Hyperbolic Problems" (square-wave tests of
 * chapter 6).
 */
export function topHat(cells: number, start: number, width: number, low = 0, high = 1): Float64Array {
  assertCells(cells);
  if (!Number.isInteger(start) || !Number.isInteger(width) || width < 0 || width > cells) {
    throw new RangeError('topHat: start and width must be integers with 0 <= width <= cells');
  }
  const out = new Float64Array(cells).fill(low);
  const first = ((start % cells) + cells) % cells;
  for (let k = 0; k < width; k++) out[(first + k) % cells] = high;
  return out;
}

/**
 * A sine sampled at cell centres: u_i = sin(2 pi periods x_i), x_i = (i + 1/2) / cells. Smooth
 * and periodic, the standard convergence test for second-order schemes.
 *
 * References: LeVeque 2002, "Finite Volume Methods for Hyperbolic Problems".
 */
export function sineWave(cells: number, periods = 1): Float64Array {
  assertCells(cells);
  const out = new Float64Array(cells);
  const k = (2 * Math.PI * periods) / cells;
  for (let i = 0; i < cells; i++) out[i] = Math.sin(k * (i + 0.5));
  return out;
}

function assertCells(cells: number): void {
  if (!Number.isInteger(cells) || cells < 0) {
    throw new RangeError('cells must be a non-negative integer');
  }
}
