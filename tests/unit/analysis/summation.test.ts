import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { sumCompensated, sumCompensatedStrided } from '@/src/analysis/summation';
import { ExactDecimal, exact, U64 } from './support';

describe('sumCompensated (Neumaier)', () => {
  it('returns 0 for empty input', () => {
    expect(sumCompensated([])).toBe(0);
  });

  it('returns the value itself for one value', () => {
    expect(sumCompensated([0.1])).toBe(0.1);
  });

  it('sums all-equal values exactly when the result is representable', () => {
    expect(sumCompensated(new Float64Array(1000).fill(0.5))).toBe(500);
  });

  it('propagates NaN', () => {
    expect(sumCompensated([1, Number.NaN, 2])).toBeNaN();
  });

  it('recovers small terms next to a large one that cancels (where Kahan summation fails)', () => {
    // 1 + 1e100 + 1 - 1e100 = 2 exactly; plain and Kahan summation give 0.
    expect(sumCompensated([1, 1e100, 1, -1e100])).toBe(2);
  });

  it('reads strided data at the given offset', () => {
    const x = [9, 1, 9, 2, 9, 3];
    expect(sumCompensatedStrided(3, x, 2, 1)).toBe(6);
  });

  it('stays within 2u|S| + small of the exact decimal sum (Higham 2002, section 4.3)', () => {
    fc.assert(
      fc.property(fc.array(fc.double({ min: -1e6, max: 1e6, noNaN: true }), { minLength: 1, maxLength: 200 }), (xs) => {
        let exactSum = new ExactDecimal(0);
        let absSum = 0;
        for (const x of xs) {
          exactSum = exactSum.plus(exact(x));
          absSum += Math.abs(x);
        }
        const error = exact(sumCompensated(xs)).minus(exactSum).abs().toNumber();
        const bound = 2 * U64 * Math.abs(exactSum.toNumber()) + 4 * xs.length * U64 * U64 * absSum;
        expect(error).toBeLessThanOrEqual(bound);
      }),
    );
  });
});
