import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { totalVariation } from '@/src/analysis/total-variation';
import type { Grid } from '@/src/analysis/types';
import { growthStats, localVariation, planeOf, stridesOf, variationGrowth } from '@/src/lib/local-variation';

function grid(shape: number[], periodic: boolean[]): Grid {
  return { axes: shape.map((size, k) => ({ name: `a${k}`, size, periodic: periodic[k]! })) };
}

function sum(values: ArrayLike<number>): number {
  let s = 0;
  for (let i = 0; i < values.length; i++) s += values[i]!;
  return s;
}

describe('stridesOf', () => {
  it('gives the last axis stride 1', () => {
    expect(stridesOf([4, 3, 2])).toEqual([6, 2, 1]);
    expect(stridesOf([5])).toEqual([1]);
  });
});

describe('localVariation', () => {
  it('attributes each forward difference to the cell it starts from', () => {
    expect(Array.from(localVariation([0, 1, 3, 3], [4], [false]))).toEqual([1, 2, 0, 0]);
  });

  it('wraps the last cell to the first on a periodic axis', () => {
    expect(Array.from(localVariation([0, 1, 3, 3], [4], [true]))).toEqual([1, 2, 0, 3]);
  });

  it('sums over both axes of a 2D grid', () => {
    // [[0, 1], [2, 4]]: cell (0,0) has |1-0| along x and |2-0| along y.
    expect(Array.from(localVariation([0, 1, 2, 4], [2, 2], [false, false]))).toEqual([3, 3, 2, 0]);
  });

  it('adds up to the total variation on random 1D, 2D and 3D grids, periodic or not', () => {
    fc.assert(
      fc.property(
        fc.array(fc.integer({ min: 1, max: 5 }), { minLength: 1, maxLength: 3 }),
        fc.array(fc.boolean(), { minLength: 3, maxLength: 3 }),
        fc.integer({ min: 0, max: 1000 }),
        (shape, flags, seed) => {
          const periodic = shape.map((_, k) => flags[k]!);
          const cells = shape.reduce((a, b) => a * b, 1);
          const values = Float64Array.from({ length: cells }, (_, i) => Math.sin(seed + i * 1.7) * 3);
          const tv = totalVariation(values, grid(shape, periodic));
          expect(sum(localVariation(values, shape, periodic))).toBeCloseTo(tv, 10);
        },
      ),
    );
  });

  it('gives zero for a single cell and for all-equal values', () => {
    expect(Array.from(localVariation([7], [1], [true]))).toEqual([0]);
    expect(Array.from(localVariation([2, 2, 2, 2], [2, 2], [true, true]))).toEqual([0, 0, 0, 0]);
  });

  it('refuses values that do not match the shape', () => {
    expect(() => localVariation([1, 2, 3], [2, 2], [false, false])).toThrow(RangeError);
    expect(() => localVariation([1, 2], [2], [false, false])).toThrow(RangeError);
  });
});

describe('variationGrowth', () => {
  it('is positive where an oscillation appeared and sums to the TV change', () => {
    const previous = [0, 0, 1, 1, 1, 0, 0];
    const current = [0, -0.1, 1.2, 0.9, 1, 0, 0];
    const g = variationGrowth(current, previous, [7], [false]);
    expect(g[1]).toBeGreaterThan(0);
    expect(g[2]).toBeGreaterThan(0);
    expect(sum(g)).toBeCloseTo(totalVariation(current) - totalVariation(previous), 12);
  });

  it('is zero everywhere when nothing changed', () => {
    const v = [0.3, 0.1, 0.8, 0.2];
    expect(Array.from(variationGrowth(v, v, [2, 2], [false, true]))).toEqual([0, 0, 0, 0]);
  });

  it('sums to the TV change on random 2D and 3D grids', () => {
    fc.assert(
      fc.property(
        fc.array(fc.integer({ min: 2, max: 4 }), { minLength: 2, maxLength: 3 }),
        fc.boolean(),
        fc.integer(),
        (shape, wrap, seed) => {
          const periodic = shape.map(() => wrap);
          const cells = shape.reduce((a, b) => a * b, 1);
          const a = Float64Array.from({ length: cells }, (_, i) => Math.cos(seed + i));
          const b = Float64Array.from({ length: cells }, (_, i) => Math.cos(seed + i * 1.3) * 2);
          const g = grid(shape, periodic);
          expect(sum(variationGrowth(b, a, shape, periodic))).toBeCloseTo(
            totalVariation(b, g) - totalVariation(a, g),
            10,
          );
        },
      ),
    );
  });

  it('marks NaN where a non-finite value takes part, so a blow-up stays visible', () => {
    const g = variationGrowth([0, Number.NaN, 0], [0, 0, 0], [3], [false]);
    expect(Number.isNaN(g[0]!)).toBe(true);
    expect(Number.isNaN(g[1]!)).toBe(true);
    expect(g[2]).toBe(0);
  });

  it('refuses steps of different sizes', () => {
    expect(() => variationGrowth([1, 2], [1, 2, 3], [2], [false])).toThrow(RangeError);
  });
});

describe('planeOf', () => {
  it('shows a 1D line as one row and a 2D field as it is', () => {
    expect(planeOf([1, 2, 3], [3])).toMatchObject({ rows: 1, cols: 3 });
    expect(planeOf([1, 2, 3, 4, 5, 6], [2, 3])).toMatchObject({ rows: 2, cols: 3 });
  });

  it('cuts the requested plane of the slowest axis of a 3D field without copying a typed array', () => {
    const values = Float64Array.from({ length: 2 * 2 * 3 }, (_, i) => i);
    const plane = planeOf(values, [2, 2, 3], 1);
    expect(Array.from(plane.values)).toEqual([6, 7, 8, 9, 10, 11]);
    expect(plane.values).toBeInstanceOf(Float64Array);
    expect((plane.values as Float64Array).buffer).toBe(values.buffer);
    expect(Array.from(planeOf([...values], [2, 2, 3], 0).values)).toEqual([0, 1, 2, 3, 4, 5]);
  });

  it('refuses a slice outside the axis', () => {
    expect(() => planeOf(new Float64Array(12), [2, 2, 3], 2)).toThrow(RangeError);
  });
});

describe('growthStats', () => {
  it('sums finite growth and reports the largest magnitude, skipping NaN', () => {
    expect(growthStats([0.5, -2, Number.NaN, 1])).toEqual({ total: -0.5, peak: 2 });
  });
});
