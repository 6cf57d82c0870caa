/**
 * Source: exact decimal arithmetic (decimal.js, 1200 significant digits) on the exact binary values
 * of the doubles. Varigate's total variation rounds each difference once (relative error <= u) and
 * sums with Neumaier compensation (error <= 2u |S| + O(m u^2) sum |x|: Neumaier 1974, "Rundungs-
 * fehleranalyse einiger Verfahren zur Summation endlicher Summen"; Higham 2002, "Accuracy and
 * Stability of Numerical Algorithms", section 4.3), so it must agree with the exact TV to within
 * 4u of its size.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { totalVariation } from '@/src/analysis/total-variation';
import { analyse, exact, exactTotalVariation, line, U64 } from '../unit/analysis/support';

const tolerance = (expected: number): number => 4 * U64 * expected;

const arrays = fc.oneof(
  fc.array(fc.double({ min: -1e3, max: 1e3, noNaN: true }), { maxLength: 400 }),
  // Values of very different sizes, where plain summation loses the small differences.
  fc.array(fc.oneof(fc.double({ min: -1e-8, max: 1e-8, noNaN: true }), fc.constantFrom(1e8, -1e8, 0)), {
    maxLength: 400,
  }),
);

describe('total variation against exact decimal arithmetic', () => {
  it('totalVariation is within 4u of the exact TV on random arrays', () => {
    fc.assert(
      fc.property(arrays, fc.boolean(), (xs, periodic) => {
        const expected = exactTotalVariation(xs, periodic);
        const actual = totalVariation(xs, undefined, { periodic });
        expect(exact(actual).minus(expected).abs().toNumber()).toBeLessThanOrEqual(tolerance(expected.toNumber()));
      }),
      { numRuns: 200 },
    );
  });

  it("the analyser's single-pass TV is within 4u of the exact TV", () => {
    fc.assert(
      fc.property(
        arrays.filter((xs) => xs.length > 0),
        fc.boolean(),
        (xs, periodic) => {
          const expected = exactTotalVariation(xs, periodic);
          const s = analyse([Float64Array.from(xs)], line(xs.length, periodic));
          expect(exact(s.series.tv[0]!).minus(expected).abs().toNumber()).toBeLessThanOrEqual(
            tolerance(expected.toNumber()),
          );
        },
      ),
      { numRuns: 200 },
    );
  });

  it('a long line (1e5 cells, four summation lanes) is within 4u of the exact TV', () => {
    const xs = Float64Array.from({ length: 100_003 }, (_, i) => Math.sin(i * 0.37) * 10 ** ((i % 7) - 3));
    const expected = exactTotalVariation(xs, true);
    const actual = totalVariation(xs, undefined, { periodic: true });
    expect(exact(actual).minus(expected).abs().toNumber()).toBeLessThanOrEqual(tolerance(expected.toNumber()));
  });
});
