import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { countExtrema, countExtremaStrided } from '@/src/analysis/extrema';
import { createNdBuffers, createStats, pass1d, passNd, type PassLimits } from '@/src/analysis/kernels';
import { totalVariation, totalVariationStrided } from '@/src/analysis/total-variation';
import type { Grid } from '@/src/analysis/types';
import { U64 } from './support';

const limitsFor = (floor: number, lower = -Infinity, upper = Infinity): PassLimits => ({
  floor,
  lowerLimit: lower - floor,
  upperLimit: upper + floor,
});

function runNd(values: Float64Array, shape: number[], periodic: boolean[], limits: PassLimits) {
  const strides = shape.map((_, k) => shape.slice(k + 1).reduce((a, b) => a * b, 1));
  const stats = createStats();
  passNd(values, shape, strides, periodic, limits, { uniform: 1 }, createNdBuffers(shape, values.length), stats);
  return stats;
}

/** Small integers make plateaus and exact ties likely; doubles make them rare. */
const lineValues = fc.oneof(
  fc.array(fc.integer({ min: -3, max: 3 }), { minLength: 2, maxLength: 80 }),
  fc.array(fc.double({ min: -10, max: 10, noNaN: true }), { minLength: 2, maxLength: 80 }),
);

describe('pass1d', () => {
  it('gives zero variation and no extrema for all-equal values, every edge below the floor', () => {
    const stats = createStats();
    pass1d(new Float64Array(6).fill(0.25), 6, true, limitsFor(1e-12), null, stats);
    expect([stats.tv, stats.extrema, stats.allowance]).toEqual([0, 0, 0]);
    expect(stats.weight).toBe(2 * 6);
    expect(stats.mass).toBe(1.5);
  });

  it('lets a NaN show in the mass, which is how the analyser notices it and repairs the step', () => {
    const stats = createStats();
    pass1d(Float64Array.from([0, Number.NaN, 1]), 3, false, limitsFor(0), null, stats);
    expect(stats.mass).toBeNaN();
  });

  it('measures the same as the general pass on one-dimensional data', () => {
    fc.assert(
      fc.property(lineValues, fc.boolean(), fc.constantFrom(0, 0.5), (xs, periodic, floor) => {
        const x = Float64Array.from(xs);
        const limits = limitsFor(floor, -1, 1);
        const fast = createStats();
        pass1d(x, x.length, periodic, limits, null, fast);
        const general = runNd(x, [x.length], [periodic], limits);
        expect(fast.extrema).toBe(general.extrema);
        expect([fast.min, fast.max, fast.argMin, fast.argMax]).toEqual([
          general.min,
          general.max,
          general.argMin,
          general.argMax,
        ]);
        expect([fast.above, fast.below]).toEqual([general.above, general.below]);
        expect(fast.weight).toBe(general.weight);
        for (const key of ['tv', 'mass', 'l1', 'weightedMagnitude'] as const) {
          expect(Math.abs(fast[key] - general[key])).toBeLessThanOrEqual(8 * U64 * Math.abs(general[key]) + 1e-300);
        }
      }),
    );
  });

  it('agrees with the reference total variation and extremum count', () => {
    fc.assert(
      fc.property(lineValues, fc.boolean(), fc.constantFrom(0, 0.5), (xs, periodic, floor) => {
        const x = Float64Array.from(xs);
        const stats = createStats();
        pass1d(x, x.length, periodic, limitsFor(floor), null, stats);
        const tv = totalVariationStrided(x.length, x, 1, 0, periodic);
        expect(Math.abs(stats.tv - tv)).toBeLessThanOrEqual(8 * U64 * tv);
        expect(stats.extrema).toBe(countExtremaStrided(x.length, x, 1, 0, periodic, floor));
      }),
    );
  });

  it('counts cells beyond the limits, and weighs mass by the cell widths', () => {
    const x = Float64Array.from([0, 2, -2, 1]);
    const stats = createStats();
    pass1d(x, 4, false, limitsFor(0, -1, 1), Float64Array.from([1, 0.5, 0.25, 2]), stats);
    expect([stats.above, stats.below]).toEqual([1, 1]);
    expect(stats.mass).toBe(0 + 1 - 0.5 + 2);
    expect(stats.l1).toBe(0 + 1 + 0.5 + 2);
  });

  it('adds the sampling allowance at each extremum: half the two neighbouring differences', () => {
    const stats = createStats();
    // One maximum at index 2 between differences 3 and -1.
    pass1d(Float64Array.from([0, 1, 4, 3]), 4, false, limitsFor(0), null, stats);
    expect(stats.allowance).toBe(0.5 * (3 + 1));
  });

  it('gives the noise weights of noise-floor.ts: run ends, sign changes and flat edges', () => {
    const stats = createStats();
    // Non-periodic [0, 1, 2, 2, 1]: signs +, +, 0, -. Weights: cell0 |0-1|=1; cell1 0;
    // cell2 |1-0| + flat out-edge = 2; cell3 flat in-edge + |0-(-1)| = 2; cell4 |-1-0| = 1.
    pass1d(Float64Array.from([0, 1, 2, 2, 1]), 5, false, limitsFor(0), null, stats);
    expect(stats.weight).toBe(6);
    expect(stats.weightedMagnitude).toBe(0 * 1 + 2 * 2 + 2 * 2 + 1 * 1);
  });
});

describe('passNd', () => {
  it('agrees with the reference total variation and extremum count on 2D and 3D grids', () => {
    fc.assert(
      fc.property(
        fc.array(fc.integer({ min: 1, max: 5 }), { minLength: 2, maxLength: 3 }),
        fc.array(fc.boolean(), { minLength: 3, maxLength: 3 }),
        fc.infiniteStream(fc.integer({ min: -2, max: 2 })),
        fc.constantFrom(0, 0.5),
        (shape, periodicAll, stream, floor) => {
          const periodic = periodicAll.slice(0, shape.length);
          const cells = shape.reduce((a, b) => a * b, 1);
          const it = stream[Symbol.iterator]();
          const x = Float64Array.from({ length: cells }, () => it.next().value as number);
          const stats = runNd(x, shape, periodic, limitsFor(floor));
          const grid: Grid = { axes: shape.map((size, k) => ({ name: `a${k}`, size, periodic: periodic[k]! })) };
          expect(stats.tv).toBe(totalVariation(x, grid)); // small integers: every sum is exact
          expect(stats.extrema).toBe(countExtrema(x, grid, { floor }));
        },
      ),
    );
  });

  it('handles a single cell and an empty grid', () => {
    const one = runNd(Float64Array.from([3]), [1, 1], [true, true], limitsFor(0));
    expect([one.tv, one.extrema, one.min, one.max]).toEqual([0, 0, 3, 3]);
    const none = runNd(new Float64Array(0), [0, 4], [false, false], limitsFor(0));
    expect([none.tv, none.extrema, none.mass]).toEqual([0, 0, 0]);
  });
});
