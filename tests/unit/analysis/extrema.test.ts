import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { countExtrema, countExtremaStrided } from '@/src/analysis/extrema';
import type { Grid } from '@/src/analysis/types';

const grid2 = (ny: number, nx: number, periodic: boolean): Grid => ({
  axes: [
    { name: 'y', size: ny, periodic },
    { name: 'x', size: nx, periodic },
  ],
});

describe('countExtremaStrided (1D)', () => {
  it('gives 0 for empty input, one value and all-equal values', () => {
    expect(countExtremaStrided(0, [], 1, 0, false)).toBe(0);
    expect(countExtremaStrided(1, [3], 1, 0, true)).toBe(0);
    expect(countExtremaStrided(5, [2, 2, 2, 2, 2], 1, 0, true)).toBe(0);
  });

  it('counts a strict interior maximum and minimum', () => {
    expect(countExtrema([0, 2, 1, 3])).toBe(2);
  });

  it('counts a plateau once', () => {
    expect(countExtrema([0, 1, 1, 1, 0])).toBe(1);
  });

  it('does not count a plateau that continues a monotone run', () => {
    expect(countExtrema([0, 1, 1, 2])).toBe(0);
  });

  it('never counts the ends of a non-periodic line', () => {
    expect(countExtrema([5, 0, 1, 2, 3])).toBe(1); // only the minimum at index 1
    expect(countExtrema([3, 3, 0])).toBe(0);
  });

  it('counts cyclically on a periodic line: a top hat has one maximum and one minimum', () => {
    expect(countExtrema([0, 0, 1, 1, 0], undefined, { periodic: true })).toBe(2);
    expect(countExtrema([0, 0, 1, 1, 0])).toBe(1);
  });

  it('ignores differences within the floor', () => {
    const noisy = [1, 1 + 1e-12, 1 - 1e-12, 1 + 2e-12, 1];
    expect(countExtrema(noisy)).toBe(3);
    expect(countExtrema(noisy, undefined, { floor: 1e-11 })).toBe(0);
  });

  it('treats NaN differences as flat', () => {
    expect(countExtrema([0, 1, Number.NaN, 1, 0])).toBe(1);
  });
});

describe('countExtrema (2D/3D)', () => {
  it('gives 0 for an empty grid, a single cell and constant data', () => {
    expect(countExtrema([], grid2(0, 3, true))).toBe(0);
    expect(countExtrema([7], grid2(1, 1, true))).toBe(0);
    expect(countExtrema(new Array(12).fill(4), grid2(3, 4, true))).toBe(0);
  });

  it('treats NaN differences as flat on 2D grids too: a NaN inside a plateau joins it', () => {
    const n = 7;
    const v = new Array(n * n).fill(0);
    for (const j of [2, 3, 4]) for (const i of [2, 3, 4]) v[j * n + i] = 1;
    v[3 * n + 3] = Number.NaN;
    expect(countExtrema(v, grid2(n, n, true))).toBe(2);
  });

  it('counts a square plateau (2D top hat) once, and its periodic background once', () => {
    const ny = 6;
    const nx = 6;
    const v = new Array(nx * ny).fill(0);
    for (const j of [2, 3]) for (const i of [2, 3]) v[j * nx + i] = 1;
    expect(countExtrema(v, grid2(ny, nx, true))).toBe(2);
    // Non-periodic: the background touches the boundary and is not counted.
    expect(countExtrema(v, grid2(ny, nx, false))).toBe(1);
  });

  it('does not count a ridge (a maximum along x but not along y)', () => {
    // Values rise along y everywhere, so no cell is higher than its y-neighbours on both sides.
    const v = [0, 1, 0, 1, 2, 1, 2, 3, 2];
    expect(countExtrema(v, grid2(3, 3, false))).toBe(0);
  });

  it('counts a single-cell peak compared with all four axis neighbours', () => {
    const v = [0, 0, 0, 0, 0, 1, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0];
    expect(countExtrema(v, grid2(4, 4, true))).toBe(2); // the peak and the periodic flat background
  });

  it('agrees with the 1D rule on grids that are one line', () => {
    fc.assert(
      fc.property(fc.array(fc.integer({ min: -3, max: 3 }), { maxLength: 60 }), fc.boolean(), (xs, periodic) => {
        const n = xs.length;
        const oneLine: Grid = {
          axes: [
            { name: 'y', size: 1, periodic: true },
            { name: 'x', size: n, periodic },
          ],
        };
        expect(countExtrema(xs, oneLine)).toBe(countExtremaStrided(n, xs, 1, 0, periodic));
      }),
    );
  });

  it('agrees with the 1D rule including the floor', () => {
    fc.assert(
      fc.property(
        fc.array(fc.double({ min: -1, max: 1, noNaN: true }), { maxLength: 60 }),
        fc.boolean(),
        (xs, periodic) => {
          const floor = 0.1;
          const oneLine: Grid = { axes: [{ name: 'x', size: xs.length, periodic }] };
          expect(countExtrema(xs, oneLine, { floor })).toBe(countExtremaStrided(xs.length, xs, 1, 0, periodic, floor));
        },
      ),
    );
  });
});
