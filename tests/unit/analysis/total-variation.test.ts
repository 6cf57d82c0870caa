import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { totalVariation, totalVariationStrided } from '@/src/analysis/total-variation';
import type { Grid } from '@/src/analysis/types';
import { U64 } from './support';

/** Values that are multiples of 2^-10 within +-2^20: sums, differences and shifts are exact. */
const dyadic = fc.integer({ min: -(2 ** 30), max: 2 ** 30 }).map((k) => k / 1024);
const doubles = fc.double({ min: -1e6, max: 1e6, noNaN: true });

/**
 * A few ulps of the expected value (the TV is within ~3u of exact; see total-variation.ts), plus
 * `absolute` for terms that underflow to subnormal numbers, where rounding is absolute.
 */
function close(actual: number, expected: number, ulps = 8, absolute = 0): void {
  expect(Math.abs(actual - expected)).toBeLessThanOrEqual(ulps * U64 * Math.abs(expected) + absolute);
}

describe('totalVariation edge cases', () => {
  it('is 0 for empty input', () => {
    expect(totalVariation([])).toBe(0);
    expect(totalVariation(new Float64Array(0), { axes: [{ name: 'x', size: 0, periodic: true }] })).toBe(0);
  });

  it('is 0 for one cell, periodic or not', () => {
    expect(totalVariation([5])).toBe(0);
    expect(totalVariation([5], undefined, { periodic: true })).toBe(0);
  });

  it('is 0 for all-equal values', () => {
    expect(totalVariation(new Float64Array(50).fill(0.3), undefined, { periodic: true })).toBe(0);
  });

  it('is NaN when a value is NaN', () => {
    expect(totalVariation([0, Number.NaN, 1])).toBeNaN();
  });

  it('adds the wrap-around difference only on periodic axes', () => {
    expect(totalVariation([0, 1, 3])).toBe(3);
    expect(totalVariation([0, 1, 3], undefined, { periodic: true })).toBe(6);
  });

  it('rejects values whose length differs from the grid', () => {
    expect(() => totalVariation([1, 2], { axes: [{ name: 'x', size: 3, periodic: false }] })).toThrow(RangeError);
  });
});

describe('totalVariation properties', () => {
  it('does not change when a constant is added (exact dyadic data)', () => {
    fc.assert(
      fc.property(fc.array(dyadic, { maxLength: 300 }), dyadic, fc.boolean(), (xs, c, periodic) => {
        const shifted = xs.map((x) => x + c);
        expect(totalVariation(shifted, undefined, { periodic })).toBe(totalVariation(xs, undefined, { periodic }));
      }),
    );
  });

  it('scales exactly by a power of two', () => {
    fc.assert(
      fc.property(fc.array(dyadic, { maxLength: 300 }), fc.integer({ min: -20, max: 20 }), (xs, p) => {
        const a = -(2 ** p);
        expect(totalVariation(xs.map((x) => a * x))).toBe(2 ** p * totalVariation(xs));
      }),
    );
  });

  it('does not change when the data are reversed', () => {
    fc.assert(
      fc.property(fc.array(doubles, { maxLength: 300 }), fc.boolean(), (xs, periodic) => {
        const reversed = [...xs].reverse();
        close(totalVariation(reversed, undefined, { periodic }), totalVariation(xs, undefined, { periodic }));
      }),
    );
  });

  it('scales with |a| when the data are multiplied by a', () => {
    fc.assert(
      fc.property(fc.array(doubles, { maxLength: 300 }), fc.double({ min: -1e3, max: 1e3, noNaN: true }), (xs, a) => {
        const scaled = xs.map((x) => a * x);
        // Each scaled value is rounded once, so allow a few more ulps than for exact data, and
        // products that land among the subnormal numbers are rounded to an absolute 2^-1075.
        close(totalVariation(scaled), Math.abs(a) * totalVariation(xs), 16, 4 * xs.length * Number.MIN_VALUE);
      }),
    );
  });

  it('equals |last - first| for monotone data', () => {
    fc.assert(
      fc.property(fc.array(doubles, { minLength: 1, maxLength: 300 }), fc.boolean(), (xs, down) => {
        const sorted = [...xs].sort((a, b) => (down ? b - a : a - b));
        close(totalVariation(sorted), Math.abs(sorted[sorted.length - 1]! - sorted[0]!));
      }),
    );
  });

  it('is additive over concatenation, with the junction difference', () => {
    fc.assert(
      fc.property(
        fc.array(doubles, { minLength: 1, maxLength: 150 }),
        fc.array(doubles, { minLength: 1, maxLength: 150 }),
        (a, b) => {
          const junction = Math.abs(b[0]! - a[a.length - 1]!);
          close(totalVariation([...a, ...b]), totalVariation(a) + junction + totalVariation(b));
        },
      ),
    );
  });

  it('on a 2D grid equals the sum of the TVs of every row and every column', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 12 }),
        fc.integer({ min: 1, max: 12 }),
        fc.boolean(),
        fc.boolean(),
        fc.infiniteStream(doubles),
        (ny, nx, py, px, stream) => {
          const it = stream[Symbol.iterator]();
          const values = Array.from({ length: nx * ny }, () => it.next().value as number);
          const grid: Grid = {
            axes: [
              { name: 'y', size: ny, periodic: py },
              { name: 'x', size: nx, periodic: px },
            ],
          };
          let expected = 0;
          for (let j = 0; j < ny; j++) expected += totalVariationStrided(nx, values, 1, j * nx, px);
          for (let i = 0; i < nx; i++) expected += totalVariationStrided(ny, values, nx, i, py);
          close(totalVariation(values, grid), expected, 16);
        },
      ),
    );
  });
});
