import { describe, expect, it } from 'vitest';
import { errorNorms, observedOrder } from '@/src/analysis/error-norms';
import type { Grid } from '@/src/analysis/types';
import { expectUlps } from './support';

describe('errorNorms', () => {
  it('gives all zeros for empty input', () => {
    expect(errorNorms([], [])).toEqual({ l1: 0, l2: 0, max: 0, maxCell: -1, nonFinite: 0 });
  });

  it('gives zeros for equal arrays, including one cell and all-equal values', () => {
    expect(errorNorms([3], [3])).toMatchObject({ l1: 0, l2: 0, max: 0 });
    expect(errorNorms([2, 2, 2], [2, 2, 2])).toMatchObject({ l1: 0, l2: 0, max: 0 });
  });

  it('weights by cell size 1/n without a grid: L1 = mean |e|, L2 = rms e', () => {
    const e = errorNorms([1, 2, 3, 4], [1, 1, 1, 1]); // errors 0, 1, 2, 3
    expect(e.l1).toBe(6 / 4);
    expect(e.l2).toBe(Math.sqrt((0 + 1 + 4 + 9) / 4));
    expect(e.max).toBe(3);
    expect(e.maxCell).toBe(3);
  });

  it('weights by the widths of a non-uniform axis', () => {
    const grid: Grid = { axes: [{ name: 'x', size: 3, periodic: false, coordinates: Float64Array.from([0, 1, 3]) }] };
    // Widths 1, 1.5, 2.
    const e = errorNorms([1, -2, 0.5], [0, 0, 0], { grid });
    expect(e.l1).toBe(1 * 1 + 2 * 1.5 + 0.5 * 2);
    expect(e.l2).toBe(Math.sqrt(1 * 1 + 4 * 1.5 + 0.25 * 2));
  });

  it('weights each cell of a 2D grid by the product of its widths', () => {
    const grid: Grid = {
      axes: [
        { name: 'y', size: 2, periodic: false, coordinates: Float64Array.from([0, 2]) },
        { name: 'x', size: 2, periodic: false, coordinates: Float64Array.from([0, 3]) },
      ],
    };
    // Widths y: 2, 2; x: 3, 3: every cell has size 6.
    expect(errorNorms([1, 1, 1, 1], [0, 0, 0, 0], { grid }).l1).toBe(24);
  });

  it('returns NaN norms and counts the cells when a value is NaN or infinite', () => {
    const e = errorNorms([1, Number.NaN, Infinity], [0, 0, 0]);
    expect(e.l1).toBeNaN();
    expect(e.l2).toBeNaN();
    expect(e.max).toBeNaN();
    expect(e.nonFinite).toBe(2);
  });

  it('rejects arrays of different lengths', () => {
    expect(() => errorNorms([1, 2], [1])).toThrow(RangeError);
  });
});

describe('observedOrder', () => {
  it('is p when halving the cell size divides the error by 2^p', () => {
    expect(observedOrder(0.4, 0.1)).toBe(2);
    expectUlps(observedOrder(0.3, 0.1, 3), 1, 8);
  });
});
