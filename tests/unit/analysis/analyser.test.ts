import { describe, expect, it } from 'vitest';
import { createAnalyser } from '@/src/analysis/analyser';
import { countExtrema } from '@/src/analysis/extrema';
import { judge } from '@/src/analysis/judge';
import { totalVariation } from '@/src/analysis/total-variation';
import type { Grid } from '@/src/analysis/types';
import { analyse, expectUlps, line, random, U64 } from './support';

const close = (actual: number, expected: number): void => {
  expect(Math.abs(actual - expected)).toBeLessThanOrEqual(8 * U64 * Math.max(1, Math.abs(expected)));
};

// Periodic line of 6 cells, width 0.5. Step 2 overshoots to 1.2 and undershoots to -0.1.
const steps = [
  Float64Array.from([0, 0, 1, 1, 0, 0]),
  Float64Array.from([0, 0.5, 1, 0.5, 0, 0]),
  Float64Array.from([0, 0.5, 1.2, 0.5, -0.1, 0.1]),
];

describe('createAnalyser series', () => {
  const s = analyse(steps, line(6, true, 0.5));

  it('records TV, its change and the change relative to the first step', () => {
    expect(s.series.tv[0]).toBe(2);
    close(s.series.tv[2]!, 0.5 + 0.7 + 0.7 + 0.6 + 0.2 + 0.1);
    expect(s.series.tvChange[0]).toBe(0);
    close(s.series.tvChange[1]!, 0);
    close(s.series.tvChangeRelative[2]!, 0.8 / 2);
    expect(s.tvReference).toBe(2);
  });

  it('counts extrema (plateaus once, cyclically) and new extrema above the previous step', () => {
    expect(s.series.extrema).toEqual([2, 2, 4]);
    expect(s.series.newExtrema).toEqual([0, 0, 2]);
  });

  it('measures overshoot and undershoot against the first step range and counts violating cells', () => {
    expect(s.bounds).toMatchObject({ lower: 0, upper: 1, lowerSource: 'first-step', upperSource: 'first-step' });
    close(s.series.overshoot[2]!, 0.2);
    close(s.series.undershoot[2]!, 0.1);
    expect(s.series.violatingCells).toEqual([0, 0, 2]);
    expect(s.series.argMax[2]).toBe(2);
    expect(s.series.argMin[2]).toBe(4);
  });

  it('integrates mass with the cell size and reports drift relative to the first step', () => {
    expect(s.series.mass[0]).toBe(1);
    close(s.series.mass[2]!, 1.1);
    close(s.series.massDrift[2]!, 0.1);
  });

  it('fails the run with findings for TV growth, new extrema, overshoot, undershoot and drift', () => {
    expect(s.verdict).toBe('fail');
    expect(s.findings.map((f) => f.kind).sort()).toEqual(
      ['conservation-drift', 'new-extrema', 'overshoot', 'tv-growth', 'undershoot'].sort(),
    );
  });

  it('locates the growth with cell-centre coordinates', () => {
    const g = s.growth.find((entry) => entry.position === 2)!;
    expect(g.ranges).toHaveLength(1);
    const r = g.ranges[0]!;
    expect(r.firstCoordinate).toBe((r.first + 0.5) * 0.5);
    expect(r.lastCoordinate).toBe((r.last + 0.5) * 0.5);
  });
});

describe('createAnalyser options', () => {
  it('uses declared physical bounds instead of the first step range', () => {
    const s = analyse(steps, line(6, true), { options: { bounds: { lower: -0.2, upper: 1.1 } } });
    expect(s.bounds).toMatchObject({ lower: -0.2, upper: 1.1, lowerSource: 'physical', upperSource: 'physical' });
    expect(s.series.violatingCells).toEqual([0, 0, 1]);
    close(s.series.overshoot[2]!, 0.1);
    expect(s.series.undershoot[2]).toBe(0);
  });

  it('records the side of the front only when a velocity sign is given', () => {
    const without = analyse(steps, line(6, true));
    const withSign = analyse(steps, line(6, true), { options: { velocitySign: 1 } });
    expect(without.growth.every((g) => g.front === undefined)).toBe(true);
    expect(withSign.growth.some((g) => g.front !== undefined)).toBe(true);
  });

  it('judges the attached findings with the policy it was given', () => {
    const s = analyse(steps, line(6, true), { policy: { newExtrema: { allow: 5 } } });
    expect(s.findings.some((f) => f.kind === 'new-extrema')).toBe(false);
  });

  it('uses the per-step significant digits of decimal text for the noise floor', () => {
    const a = createAnalyser({ name: 'c', grid: line(3), precision: { kind: 'decimal', significantDigits: 8 } });
    a.push({ index: 0, time: 0, values: Float64Array.from([1, 2, 3]) });
    a.push({ index: 1, time: 1, values: Float64Array.from([1, 2, 3]) }, 3);
    const s = a.finish();
    expectUlps(s.series.unitRoundoff[0], 5e-8, 4);
    expectUlps(s.series.unitRoundoff[1], 5e-3, 4);
  });

  it('accepts float32 snapshots', () => {
    const s = analyse([Float32Array.from([0, 1, 0, 0])], line(4), { precision: { kind: 'float32' } });
    expect(s.series.tv[0]).toBe(2);
  });
});

describe('createAnalyser edge cases', () => {
  it('analyses an empty grid to zeros and a pass', () => {
    const s = analyse([new Float64Array(0), new Float64Array(0)], line(0));
    expect(s.cells).toBe(0);
    expect(s.series.tv).toEqual([0, 0]);
    expect(s.series.min).toEqual([0, 0]);
    expect(s.verdict).toBe('pass');
  });

  it('analyses a single cell: no variation, no extrema', () => {
    const s = analyse([Float64Array.from([2]), Float64Array.from([2])], line(1));
    expect(s.series.tv).toEqual([0, 0]);
    expect(s.series.extrema).toEqual([0, 0]);
    expect(s.verdict).toBe('pass');
  });

  it('passes all-equal values', () => {
    const same = new Float64Array(10).fill(0.7);
    const s = analyse([same, same, same], line(10));
    expect(s.series.tv).toEqual([0, 0, 0]);
    expect(s.series.extrema).toEqual([0, 0, 0]);
    expect(s.findings).toEqual([]);
  });

  it('reports NaN and infinities with the first step and cell, and always fails', () => {
    const bad = Float64Array.from([0, 1, 0, Number.NaN, 0, Infinity]);
    const s = analyse([steps[0]!, bad, steps[0]!], line(6), { policy: { bounds: { check: 'off' } } });
    expect(s.nonFinite).toMatchObject({ firstStep: 1, firstCell: 3, firstCellIndex: [3], count: 2, steps: 1 });
    expect(s.series.nonFinite).toEqual([0, 2, 0]);
    const finding = s.findings.find((f) => f.kind === 'non-finite')!;
    expect(finding).toMatchObject({ severity: 'fail', step: 1, magnitude: 2 });
    expect(finding.message).toContain('cell 3');
    // The other metrics of the bad step stay finite (the bad values take the previous step's).
    expect(s.series.tv.every(Number.isFinite)).toBe(true);
    expect(s.series.mass.every(Number.isFinite)).toBe(true);
  });

  it('fails on non-finite values even when every configurable rule is off', () => {
    const off = { check: 'off' as const };
    const s = analyse([Float64Array.from([Number.NaN, 1])], line(2), {
      policy: { tvGrowth: off, newExtrema: off, bounds: off, conservation: off, baseline: off },
    });
    expect(s.verdict).toBe('fail');
  });

  it('rejects a step whose length differs from the grid, a step index that does not increase, and pushes after finish', () => {
    const a = createAnalyser({ name: 'c', grid: line(3), precision: { kind: 'float64' } });
    expect(() => a.push({ index: 0, time: 0, values: new Float64Array(2) })).toThrow(RangeError);
    a.push({ index: 5, time: 0, values: new Float64Array(3) });
    expect(() => a.push({ index: 5, time: 0, values: new Float64Array(3) })).toThrow(RangeError);
    a.finish();
    expect(() => a.push({ index: 6, time: 0, values: new Float64Array(3) })).toThrow(Error);
  });

  it('rejects grids with more than three axes', () => {
    const axes = ['a', 'b', 'c', 'd'].map((name) => ({ name, size: 1, periodic: false }));
    expect(() => createAnalyser({ name: 'c', grid: { axes }, precision: { kind: 'float64' } })).toThrow(RangeError);
  });

  it('sets the noise floor from the current step when the field grows from zero', () => {
    // Step 1 has a plateau at 0.5 with one-ulp jitter: flat once the floor scales with max |phi|.
    const bump = Float64Array.from([0, 0.25, 0.5, 0.5 + 2 ** -53, 0.5 - 2 ** -54, 0.5, 0.25, 0]);
    const s = analyse([new Float64Array(8), bump], line(8, true));
    expect(s.series.extrema).toEqual([0, 2]);
    expectUlps(s.series.magnitude[1], 0.5, 2);
  });
});

describe('createAnalyser on 2D grids', () => {
  const grid: Grid = {
    axes: [
      { name: 'y', size: 7, periodic: true },
      { name: 'x', size: 9, periodic: false },
    ],
  };
  const r = random(3);
  const a = Float64Array.from({ length: 63 }, () => Math.round(4 * r()) / 4);
  const b = Float64Array.from(a, (v, i) => (i === 31 ? v + 3 : v));

  it('agrees with the reference TV and extremum count', () => {
    const s = analyse([a, b], grid);
    expect(s.series.tv[0]).toBe(totalVariation(a, grid));
    expect(s.series.extrema[1]).toBe(countExtrema(b, grid, { floor: s.series.valueFloor[1]! }));
  });

  it('puts the growth box around the raised cell', () => {
    const s = analyse([a, b], grid);
    const g = s.growth.find((entry) => entry.position === 1)!;
    const [y, x] = g.ranges;
    // Cell 31 is (y 3, x 4); its forward differences reach (3, 5) and (4, 4).
    expect(y!.first).toBeLessThanOrEqual(3);
    expect(y!.last).toBeGreaterThanOrEqual(3);
    expect(x!.first).toBeLessThanOrEqual(4);
    expect(x!.last).toBeGreaterThanOrEqual(4);
  });
});

describe('summary', () => {
  it('survives a JSON round trip unchanged and re-judges to the same findings without raw data', () => {
    const bad = Float64Array.from([0, 1, 0, Number.NaN, 0, 0]);
    const s = analyse([...steps, bad], line(6, true), {
      options: { velocitySign: 1 },
      time: (k) => (k === 1 ? Number.NaN : k),
    });
    const parsed = JSON.parse(JSON.stringify(s)) as typeof s;
    expect(parsed).toEqual(s);
    expect(parsed.series.time[1]).toBeNull();
    expect(judge(parsed).findings).toEqual(s.findings);
  });
});
