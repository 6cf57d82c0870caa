import { describe, expect, it } from 'vitest';
import { axisCentre, axisWidths, cellSizes, gridLayout, totalCellSize, unravelIndex } from '@/src/analysis/grid';
import type { Grid } from '@/src/analysis/types';

const grid3: Grid = {
  axes: [
    { name: 'z', size: 2, periodic: false },
    { name: 'y', size: 3, periodic: true },
    { name: 'x', size: 4, periodic: false },
  ],
};

describe('gridLayout', () => {
  it('gives row-major strides with the last axis fastest', () => {
    expect(gridLayout(grid3).strides).toEqual([12, 4, 1]);
    expect(gridLayout(grid3).cells).toBe(24);
  });

  it('lets per-variable options override the periodicity of a named axis', () => {
    expect(gridLayout(grid3, { periodic: { x: true, y: false } }).periodic).toEqual([false, false, true]);
  });

  it('handles an empty axis as zero cells', () => {
    expect(gridLayout({ axes: [{ name: 'x', size: 0, periodic: false }] }).cells).toBe(0);
  });

  it('rejects a negative or fractional size', () => {
    expect(() => gridLayout({ axes: [{ name: 'x', size: -1, periodic: false }] })).toThrow(RangeError);
    expect(() => gridLayout({ axes: [{ name: 'x', size: 1.5, periodic: false }] })).toThrow(RangeError);
  });
});

describe('axisWidths and axisCentre', () => {
  it('uses the spacing for uniform axes and puts the first centre at half a cell', () => {
    const axis = { name: 'x', size: 3, periodic: false, spacing: 0.5 };
    expect(Array.from(axisWidths(axis))).toEqual([0.5, 0.5, 0.5]);
    expect(axisCentre(axis, 0)).toBe(0.25);
    expect(axisCentre(axis, 2)).toBe(1.25);
  });

  it('puts faces halfway between coordinates and mirrors the end faces', () => {
    const axis = { name: 'x', size: 4, periodic: false, coordinates: Float64Array.from([0, 1, 3, 7]) };
    // Faces at -0.5, 0.5, 2, 5, 9: widths 1, 1.5, 3, 4 (they add up to 9.5 = 9 - (-0.5)).
    expect(Array.from(axisWidths(axis))).toEqual([1, 1.5, 3, 4]);
    expect(axisCentre(axis, 2)).toBe(3);
  });

  it('gives a single cell the spacing', () => {
    expect(
      Array.from(axisWidths({ name: 'x', size: 1, periodic: false, coordinates: Float64Array.from([4]) })),
    ).toEqual([1]);
  });

  it('rejects coordinates that do not increase', () => {
    const axis = { name: 'x', size: 3, periodic: false, coordinates: Float64Array.from([0, 2, 2]) };
    expect(() => axisWidths(axis)).toThrow(/strictly increasing/);
  });
});

describe('cellSizes', () => {
  it('multiplies the spacings of uniform axes', () => {
    const g: Grid = {
      axes: [
        { name: 'y', size: 2, periodic: false, spacing: 2 },
        { name: 'x', size: 5, periodic: false, spacing: 0.25 },
      ],
    };
    const sizes = cellSizes(g);
    expect(sizes).toEqual({ uniform: 0.5 });
    expect(totalCellSize(sizes, [2, 5])).toBe(5);
  });

  it('prefers options.cellSize over the grid', () => {
    expect(cellSizes(grid3, { cellSize: 3 })).toEqual({ uniform: 3 });
  });

  it('keeps per-axis widths when an axis has coordinates', () => {
    const g: Grid = { axes: [{ name: 'x', size: 3, periodic: false, coordinates: Float64Array.from([0, 1, 3]) }] };
    const sizes = cellSizes(g);
    expect('widths' in sizes && Array.from(sizes.widths[0]!)).toEqual([1, 1.5, 2]);
    expect(totalCellSize(sizes, [3])).toBe(4.5);
  });
});

describe('unravelIndex', () => {
  it('splits a flat index slowest axis first', () => {
    expect(unravelIndex(0, [2, 3, 4])).toEqual([0, 0, 0]);
    expect(unravelIndex(23, [2, 3, 4])).toEqual([1, 2, 3]);
    expect(unravelIndex(13, [2, 3, 4])).toEqual([1, 0, 1]);
  });
});
