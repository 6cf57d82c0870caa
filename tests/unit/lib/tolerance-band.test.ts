import { describe, expect, it } from 'vitest';
import { createAnalyser } from '@/src/analysis/analyser';
import { judge } from '@/src/analysis/judge';
import { DEFAULT_POLICY, resolveRules } from '@/src/analysis/policy';
import { runAdvection1d, topHat } from '@/src/analysis/schemes';
import { boundTolerances, driftThresholds, tvBand, tvGrowthThresholds } from '@/src/lib/tolerance-band';

describe('tvGrowthThresholds', () => {
  const rule = { failRelative: 1e-9, warnRelative: 1e-10, smoothProfile: false };

  it('is the relative tolerance times TV_ref when that exceeds the noise floor, and null at the first step', () => {
    const t = tvGrowthThresholds({ tv: [2, 2, 2.5], tvNoise: [1e-15, 1e-15, 1e-15] }, rule, 2);
    expect(t.fail).toEqual([null, 2e-9, 2e-9]);
    expect(t.warn).toEqual([null, 2e-10, 2e-10]);
    expect(t.floor).toEqual([null, 2e-15, 2e-15]);
  });

  it('never drops below the noise floor of the two steps, so round-off cannot fail a step', () => {
    const t = tvGrowthThresholds({ tv: [2, 2], tvNoise: [3e-9, 4e-9] }, rule, 2);
    expect(t.fail[1]).toBe(7e-9);
    expect(t.warn[1]).toBe(7e-9);
  });

  it("uses the previous step's sampling allowance in smooth-profile mode only", () => {
    const series = { tv: [2, 2], tvNoise: [0, 0], samplingAllowance: [1e-3, 0] };
    expect(tvGrowthThresholds(series, rule, 2).fail[1]).toBe(2e-9);
    expect(tvGrowthThresholds(series, { ...rule, smoothProfile: true }, 2).fail[1]).toBe(1e-3);
  });

  it('gives nothing to draw for an empty series', () => {
    expect(tvGrowthThresholds({ tv: [], tvNoise: [] }, rule, 1)).toEqual({ fail: [], warn: [], floor: [] });
  });
});

describe('tvBand', () => {
  it("runs from the previous step's TV to that TV plus the fail threshold", () => {
    const band = tvBand([2, 1.9, 2.3], [null, 0.01, 0.01]);
    expect(band.lower).toEqual([null, 2, 1.9]);
    expect(band.upper).toEqual([null, 2.01, 1.9 + 0.01]);
    // Step 2 rose by 0.4, above the band's top: that is the step that failed.
    expect(2.3).toBeGreaterThan(band.upper[2]!);
  });
});

describe('driftThresholds', () => {
  it('is the relative tolerance unless the mass rounding error of the two steps is larger', () => {
    const d = driftThresholds([1e-12, 1e-12, 1e-3], 1, { failRelative: 1e-6, warnRelative: 1e-8 });
    expect(d.fail).toEqual([null, 1e-6, 1e-12 + 1e-3]);
    expect(d.warn).toEqual([null, 1e-8, 1e-12 + 1e-3]);
  });

  it('treats a zero mass scale as 1 instead of dividing by zero', () => {
    const d = driftThresholds([0, 2], 0, { failRelative: 0, warnRelative: 0 });
    expect(d.fail[1]).toBe(2);
  });
});

describe('boundTolerances', () => {
  it('takes the largest of the absolute tolerance, the relative one times the first range, and the value floor', () => {
    const series = { min: [0, -0.1], max: [2, 2.1], valueFloor: [1e-16, 0.5] };
    expect(boundTolerances(series, { tolerance: 0.01, relativeTolerance: 0.01 })).toEqual([0.02, 0.5]);
    expect(boundTolerances(series, { tolerance: 0, relativeTolerance: 0 })).toEqual([1e-16, 0.5]);
  });
});

describe('the chart band agrees with the verdict', () => {
  /** A top hat advected by an unlimited and by a limited scheme, analysed as a run would be. */
  function summaryOf(scheme: 'lax-wendroff' | 'limited') {
    const snapshots = runAdvection1d({
      initial: topHat(80, 20, 20),
      courant: 0.5,
      steps: 40,
      every: 4,
      scheme,
      ...(scheme === 'limited' ? { limiter: 'van-leer' as const } : {}),
    });
    const analyser = createAnalyser({
      name: 'c',
      grid: { axes: [{ name: 'x', size: 80, periodic: true }] },
      precision: { kind: 'float64' },
    });
    snapshots.forEach((values, k) => analyser.push({ index: k * 4, time: k * 4 * 0.5, values }));
    return analyser.finish();
  }

  it.each(['lax-wendroff', 'limited'] as const)(
    '%s: a step rises above the band exactly when the judge fails it for TV growth',
    (scheme) => {
      const s = summaryOf(scheme);
      const rules = resolveRules(DEFAULT_POLICY, { variable: 'c', dims: 1, options: {} });
      const t = tvGrowthThresholds(s.series, rules.tvGrowth, s.tvReference);
      const band = tvBand(s.series.tv, t.fail);
      const above = s.series.tv.flatMap((tv, n) => (n > 0 && tv > band.upper[n]! ? [s.series.index[n]!] : []));
      const finding = judge(s).findings.find((f) => f.kind === 'tv-growth' && f.severity === 'fail');
      if (scheme === 'limited') {
        expect(above).toEqual([]);
        expect(finding).toBeUndefined();
      } else {
        expect(above.length).toBeGreaterThan(0);
        expect(finding?.step).toBe(above[0]);
        expect(finding?.steps).toBe(above.length);
        expect(finding?.threshold).toBe(t.fail[s.series.index.indexOf(above[0]!)]);
      }
    },
  );
});
