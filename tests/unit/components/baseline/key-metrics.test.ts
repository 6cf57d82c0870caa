import { describe, expect, it } from 'vitest';
import { changeOf, compareKeyMetrics, formatMetric, KEY_METRICS } from '@/src/components/baseline/key-metrics';

const metrics = (m: Partial<Record<string, number>>) => ({
  maxTvGrowthRelative: 0,
  maxNewExtrema: 0,
  maxOvershoot: 0,
  maxUndershoot: 0,
  maxMassDrift: 0,
  ...m,
});

describe('baseline key metrics', () => {
  it('puts baseline and run side by side per variable and metric, and says which got worse', () => {
    const rows = compareKeyMetrics(
      [{ variable: 'u', metrics: metrics({ maxTvGrowthRelative: 1e-3, maxNewExtrema: 2 }) }],
      [{ variable: 'u', metrics: metrics({ maxTvGrowthRelative: 5e-4, maxNewExtrema: 4 }) }],
    );
    expect(rows).toHaveLength(KEY_METRICS.length);
    expect(rows.find((r) => r.metric === 'maxTvGrowthRelative')).toMatchObject({
      baseline: 1e-3,
      run: 5e-4,
      change: 'better',
    });
    expect(rows.find((r) => r.metric === 'maxNewExtrema')).toMatchObject({
      baseline: 2,
      run: 4,
      change: 'worse',
      integer: true,
    });
    expect(rows.find((r) => r.metric === 'maxOvershoot')).toMatchObject({ change: 'same' });
  });

  it('without a baseline shows the run alone', () => {
    const rows = compareKeyMetrics(null, [{ variable: 'c', metrics: metrics({ maxOvershoot: 0.1 }) }]);
    expect(rows.every((r) => r.baseline === null && r.change === 'only-run')).toBe(true);
  });

  it('lists variables that only one side has', () => {
    const rows = compareKeyMetrics(
      [{ variable: 'old', metrics: metrics({}) }],
      [{ variable: 'new', metrics: metrics({}) }],
    );
    expect(rows.filter((r) => r.variable === 'new').every((r) => r.change === 'only-run')).toBe(true);
    expect(rows.filter((r) => r.variable === 'old').every((r) => r.change === 'only-baseline')).toBe(true);
  });

  it('treats a missing or non-finite stored metric as absent', () => {
    const rows = compareKeyMetrics(
      [{ variable: 'u', metrics: { maxMassDrift: Number.NaN } }],
      [{ variable: 'u', metrics: {} }],
    );
    expect(rows.find((r) => r.metric === 'maxMassDrift')).toMatchObject({
      baseline: null,
      run: null,
      change: 'only-baseline',
    });
    expect(changeOf(null, 1)).toBe('only-run');
  });

  it('formats integers as counts and the rest in exponent form', () => {
    expect(formatMetric(3, true)).toBe('3');
    expect(formatMetric(0.000123, false)).toBe('1.2e-4');
    expect(formatMetric(0, false)).toBe('0');
    expect(formatMetric(null, false)).toBe('—');
  });
});
