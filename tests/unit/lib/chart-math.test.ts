import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  blockOf,
  blockRange,
  cellWindow,
  clampPosition,
  extentOf,
  formatNumber,
  frameScales,
  indexOfSorted,
  nearestIndex,
  outOfBoundsSpans,
  stepLabel,
  symmetricExtent,
  tickCount,
} from '@/src/lib/chart-math';

describe('extentOf', () => {
  it('spans every finite value of every column, padded, skipping nulls and NaN', () => {
    expect(
      extentOf(
        [
          [1, null, 3],
          [Number.NaN, 2],
        ],
        { pad: 0 },
      ),
    ).toEqual([1, 3]);
    expect(extentOf([[0, 10]], { pad: 0.1 })).toEqual([-1, 11]);
  });

  it('includes extra values such as the bounds', () => {
    expect(extentOf([[0.2, 0.8]], { include: [0, 1], pad: 0 })).toEqual([0, 1]);
  });

  it('gives [0, 1] for no data and a range around a single value, so flat curves are not on an edge', () => {
    expect(extentOf([[], [null]])).toEqual([0, 1]);
    expect(extentOf([[0, 0]])).toEqual([-1, 1]);
    const [lo, hi] = extentOf([[2, 2]]);
    expect(lo).toBeLessThan(2);
    expect(hi).toBeGreaterThan(2);
  });
});

describe('frameScales and tickCount', () => {
  const frame = { width: 400, height: 200, margin: { top: 10, right: 10, bottom: 30, left: 60 } };

  it('maps the x domain onto the inner width exactly and puts larger y values higher', () => {
    const { x, y } = frameScales(frame, [0, 20], [0, 1]);
    expect(x(0)).toBe(0);
    expect(x(20)).toBe(330);
    expect(y(1)).toBeLessThan(y(0));
    expect(y(0)).toBe(160);
  });

  it('rounds the y domain outwards to nice values', () => {
    const { y } = frameScales(frame, [0, 1], [0.013, 0.987]);
    const [lo, hi] = y.domain();
    expect(lo).toBeLessThanOrEqual(0.013);
    expect(hi).toBeGreaterThanOrEqual(0.987);
  });

  it('asks for fewer ticks in a narrow chart, never fewer than two', () => {
    expect(tickCount(700)).toBe(10);
    expect(tickCount(100)).toBe(2);
    expect(tickCount(0)).toBe(2);
  });
});

describe('nearestIndex', () => {
  it('finds the nearest entry, clamps outside the range, and prefers the smaller index on a tie', () => {
    const xs = [0, 10, 20, 40];
    expect(nearestIndex(xs, 11)).toBe(1);
    expect(nearestIndex(xs, 31)).toBe(3);
    expect(nearestIndex(xs, 30)).toBe(2);
    expect(nearestIndex(xs, -5)).toBe(0);
    expect(nearestIndex(xs, 99)).toBe(3);
    expect(nearestIndex([], 1)).toBe(-1);
  });

  it('agrees with a linear scan on random increasing lists', () => {
    fc.assert(
      fc.property(
        fc.uniqueArray(fc.integer({ min: -1000, max: 1000 }), { minLength: 1, maxLength: 80 }),
        fc.double({ min: -1200, max: 1200, noNaN: true }),
        (raw, x) => {
          const xs = [...raw].sort((a, b) => a - b);
          const i = nearestIndex(xs, x);
          const best = Math.min(...xs.map((v) => Math.abs(v - x)));
          expect(Math.abs(xs[i]! - x)).toBe(best);
        },
      ),
    );
  });

  it('indexOfSorted finds exact step numbers only', () => {
    expect(indexOfSorted([0, 5, 10], 5)).toBe(1);
    expect(indexOfSorted([0, 5, 10], 6)).toBe(-1);
  });
});

describe('clampPosition', () => {
  it('keeps positions inside the list', () => {
    expect(clampPosition(-1, 5)).toBe(0);
    expect(clampPosition(7, 5)).toBe(4);
    expect(clampPosition(2.4, 5)).toBe(2);
    expect(clampPosition(3, 0)).toBe(0);
  });
});

describe('cellWindow', () => {
  it('widens a finding range by its own width on each side, clamped to the line', () => {
    expect(cellWindow(40, 60, 100)).toEqual({ from: 30, to: 70 });
    expect(cellWindow(0, 30, 100)).toEqual({ from: 0, to: 45 });
  });

  it('shows at least minHalf cells around a single-cell finding', () => {
    expect(cellWindow(50, 50, 100, 8)).toEqual({ from: 42, to: 58 });
    expect(cellWindow(99, 99, 100, 8)).toEqual({ from: 91, to: 99 });
  });

  it('shows the whole line for a range that wraps round a periodic axis', () => {
    expect(cellWindow(95, 3, 100)).toEqual({ from: 0, to: 99 });
  });
});

describe('outOfBoundsSpans', () => {
  const bounds = { lower: 0, upper: 1 };

  it('returns one span per run of points above or below the bounds, reaching half-way to the neighbours', () => {
    const spans = outOfBoundsSpans([0, 2, 4, 6, 8], [0.5, 1.2, 1.1, 0.5, -0.3], bounds);
    expect(spans).toEqual([
      { from: 1, to: 5, side: 'over' },
      { from: 7, to: 8.5, side: 'under' },
    ]);
  });

  it('ignores excursions within the tolerance and null values', () => {
    expect(outOfBoundsSpans([0, 1, 2], [1.0005, null, -0.0005], bounds, 0.001)).toEqual([]);
  });

  it('gives a lone violating cell at least one cell of width', () => {
    expect(outOfBoundsSpans([0, 1, 2], [0.5, 1.5, 0.5], bounds)).toEqual([{ from: 0.5, to: 1.5, side: 'over' }]);
  });
});

describe('symmetricExtent', () => {
  it('centres the growth colour scale on zero', () => {
    expect(symmetricExtent([-0.2, 0.5, null])).toEqual([-0.5, 0.5]);
    expect(symmetricExtent([0, 0])).toEqual([-1, 1]);
  });
});

describe('blockOf and blockRange', () => {
  it('inverts the block mapping of downsample2d', () => {
    // 100 cells in 10 blocks: cells 0-9 are block 0, 90-99 block 9.
    expect(blockOf(9, 100, 10)).toBe(0);
    expect(blockOf(10, 100, 10)).toBe(1);
    expect(blockOf(99, 100, 10)).toBe(9);
    expect(blockRange(15, 37, 100, 10)).toEqual({ from: 1, to: 3 });
  });

  it('is the identity when nothing was downsampled and covers the axis for a wrapping range', () => {
    expect(blockOf(7, 20, 20)).toBe(7);
    expect(blockRange(18, 2, 20, 20)).toEqual({ from: 0, to: 19 });
  });
});

describe('formatNumber and stepLabel', () => {
  it('prints four significant digits, exponent form for tiny values, a dash for missing ones', () => {
    expect(formatNumber(1.23456)).toBe('1.235');
    expect(formatNumber(2e-9)).toBe('2.00e-9');
    expect(formatNumber(0)).toBe('0');
    expect(formatNumber(null)).toBe('–');
  });

  it('labels a step with its time when there is one', () => {
    expect(stepLabel(140, 0.35)).toBe('Step 140 · t = 0.35');
    expect(stepLabel(3, null)).toBe('Step 3');
  });
});
