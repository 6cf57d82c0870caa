import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { keepPositions, pickAt } from '@/src/lib/series-decimate';

describe('keepPositions', () => {
  it('keeps every step when the series fits', () => {
    expect(keepPositions(4, [[1, 2, 3, 4]], 10)).toEqual([0, 1, 2, 3]);
    expect(keepPositions(0, [[]], 10)).toEqual([]);
  });

  it('keeps a one-step spike of any column among 5,000 steps', () => {
    const count = 5000;
    const tv = Array.from({ length: count }, (_, i) => 1 - i * 1e-6);
    const extrema = new Array<number>(count).fill(4);
    tv[1234] = 3; // TV jumps at one step
    extrema[4321] = 9; // new extrema at another
    const kept = keepPositions(count, [tv, extrema], 400);
    expect(kept).toContain(1234);
    expect(kept).toContain(4321);
  });

  it('keeps the first and last step and every step with a finding', () => {
    const flat = new Array<number>(1000).fill(1);
    const kept = keepPositions(1000, [flat], 40, [517, 5000, -1]);
    expect(kept[0]).toBe(0);
    expect(kept.at(-1)).toBe(999);
    expect(kept).toContain(517);
  });

  it('stays within the point budget plus the forced positions, increasing and without repeats', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 50, max: 3000 }),
        fc.integer({ min: 10, max: 200 }),
        fc.array(fc.double({ noNaN: true, min: -1e6, max: 1e6 }), { minLength: 3, maxLength: 3 }),
        (count, maxPoints, seeds) => {
          const columns = seeds.map((s, k) => Array.from({ length: count }, (_, i) => Math.sin(s + i * (k + 1))));
          const kept = keepPositions(count, columns, maxPoints);
          expect(kept.length).toBeLessThanOrEqual(
            Math.max(count <= maxPoints ? count : maxPoints + 2, 2 * columns.length + 2),
          );
          for (let i = 1; i < kept.length; i++) expect(kept[i]!).toBeGreaterThan(kept[i - 1]!);
        },
      ),
    );
  });

  it('still keeps a point in a bucket where every value is missing', () => {
    const column = Array.from({ length: 100 }, (_, i) => (i < 50 ? null : i));
    const kept = keepPositions(100, [column], 20);
    expect(kept.some((p) => p > 0 && p < 50)).toBe(true);
  });
});

describe('pickAt', () => {
  it('picks the kept positions and turns NaN, infinities and missing entries into null', () => {
    expect(pickAt([1, Number.NaN, 3, Number.POSITIVE_INFINITY], [0, 1, 3, 9])).toEqual([1, null, null, null]);
    expect(pickAt(undefined, [0])).toEqual([null]);
  });
});
