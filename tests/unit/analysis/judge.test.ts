import { describe, expect, it } from 'vitest';
import { judge } from '@/src/analysis/judge';
import type { VariableSummary } from '@/src/analysis/summary';
import { analyse, expectUlps, line } from './support';

/** A clean three-step run (a top hat that does not move), to be edited per test. */
function cleanRun(name = 'phi', options = {}): VariableSummary {
  const hat = Float64Array.from([0, 0, 1, 1, 0, 0, 0, 0]);
  return analyse([hat, hat, hat], line(8, true), { name, options });
}

/** Sets the TV change of step `n` (and the TVs after it) to `change`. */
function withTvChange(s: VariableSummary, n: number, change: number): VariableSummary {
  const t = structuredClone(s);
  t.series.tvChange[n] = change;
  t.series.tvChangeRelative[n] = change / t.tvReference;
  for (let k = n; k < t.series.tv.length; k++) t.series.tv[k] = t.series.tv[k]! + change;
  return t;
}

const kinds = (s: VariableSummary, policy = {}): string[] =>
  judge(s, policy).findings.map((f) => `${f.kind}:${f.severity}`);

describe('judge: TV growth', () => {
  it('passes a run whose TV never grows', () => {
    expect(judge(cleanRun()).verdict).toBe('pass');
  });

  it('never flags growth below the noise floor, even with zero tolerances', () => {
    const s = cleanRun();
    const floor = s.series.tvNoise[0]! + s.series.tvNoise[1]!;
    const zero = { tvGrowth: { failRelative: 0, warnRelative: 0 } };
    expect(kinds(withTvChange(s, 1, 0.5 * floor), zero)).toEqual([]);
    expect(kinds(withTvChange(s, 1, 2 * floor), zero)).toEqual(['tv-growth:fail']);
  });

  it('warns inside the warn band and fails above the fail threshold', () => {
    const s = cleanRun();
    const tv0 = s.series.tv[0]!;
    expect(kinds(withTvChange(s, 1, 5e-10 * tv0))).toEqual(['tv-growth:warn']);
    expect(kinds(withTvChange(s, 1, 5e-9 * tv0))).toEqual(['tv-growth:fail']);
    expect(judge(withTvChange(s, 1, 5e-10 * tv0)).verdict).toBe('warn');
  });

  it("demotes failures to warnings with check 'warn' and skips the rule with 'off'", () => {
    const grown = withTvChange(cleanRun(), 1, 0.1);
    expect(kinds(grown, { tvGrowth: { check: 'warn' } })).toEqual(['tv-growth:warn']);
    expect(kinds(grown, { tvGrowth: { check: 'off' } })).toEqual([]);
  });

  it('applies a per-variable override only to that variable', () => {
    const grown = withTvChange(cleanRun('rho'), 1, 1e-5);
    expect(kinds(grown, { variables: { rho: { tvGrowth: { failRelative: 1e-3, warnRelative: 1e-3 } } } })).toEqual([]);
    expect(kinds(grown, { variables: { other: { tvGrowth: { failRelative: 1e-3 } } } })).toEqual(['tv-growth:fail']);
  });

  it('uses the looser system band for a variable flagged as a system component', () => {
    const grown = withTvChange(cleanRun('rho', { system: true }), 1, 1e-4 * 2);
    expect(kinds(grown)).toEqual(['tv-growth:warn']);
  });

  it('reports one finding per rule: the first step at the worst severity, the worst step and the count', () => {
    let s = withTvChange(cleanRun(), 1, 5e-10 * 2);
    s = withTvChange(s, 2, 0.3);
    const f = judge(s).findings.find((x) => x.kind === 'tv-growth')!;
    expect(f).toMatchObject({ severity: 'fail', step: 2, steps: 2, worst: { step: 2, magnitude: 0.3 } });
    expectUlps(f.relative!, 0.3 / s.tvReference, 2);
  });

  it('writes a one-line message with size, percentage and step', () => {
    const s = withTvChange(cleanRun(), 1, 0.032);
    const f = judge(s).findings[0]!;
    expect(f.message).toBe('phi: TV grew by 3.2e-2 (1.6 %) at step 1 (t = 1)');
    expect(f.message).not.toContain('\n');
  });
});

describe('judge: extrema, bounds, conservation', () => {
  it('fails on new extrema unless the policy allows that many', () => {
    const s = structuredClone(cleanRun());
    s.series.newExtrema[2] = 2;
    expect(kinds(s)).toEqual(['new-extrema:fail']);
    expect(kinds(s, { newExtrema: { allow: 2 } })).toEqual([]);
  });

  it('fails on overshoot beyond the tolerance, absolute or relative to the first range', () => {
    const s = structuredClone(cleanRun());
    s.series.max[2] = 1.05;
    expect(kinds(s)).toEqual(['overshoot:fail']);
    expect(kinds(s, { bounds: { tolerance: 0.1 } })).toEqual([]);
    expect(kinds(s, { bounds: { relativeTolerance: 0.04 } })).toEqual(['overshoot:fail']);
    expect(kinds(s, { bounds: { relativeTolerance: 0.06 } })).toEqual([]);
  });

  it('judges against physical bounds declared in the policy, from the stored min and max', () => {
    const s = cleanRun('c');
    expect(kinds(s, { variables: { c: { bounds: { lower: 0.1 } } } })).toEqual(['undershoot:fail']);
    const f = judge(s, { variables: { c: { bounds: { upper: 0.5 } } } }).findings[0]!;
    expect(f.message).toContain('physical upper bound 0.5');
    expect(f.location?.ranges[0]?.first).toBe(s.series.argMax[0]);
  });

  it('warns on drift above 1e-8 and fails above 1e-6, and ignores non-conservative variables', () => {
    const s = structuredClone(cleanRun('m'));
    s.series.massDrift[1] = 1e-7;
    expect(kinds(s)).toEqual(['conservation-drift:warn']);
    s.series.massDrift[1] = -1e-5;
    expect(kinds(s)).toEqual(['conservation-drift:fail']);
    expect(kinds(s, { variables: { m: { conservative: false } } })).toEqual([]);
    const manifest = structuredClone(s);
    manifest.options = { conservative: false };
    expect(kinds(manifest)).toEqual([]);
  });
});

describe('judge: baseline', () => {
  const base = withTvChange(cleanRun(), 1, 0.1);

  it('fails when a metric is worse than the baseline by more than the margin', () => {
    const worse = withTvChange(cleanRun(), 1, 0.115);
    const f = judge(worse, {}, base).findings.filter((x) => x.kind === 'baseline-regression');
    expect(f).toHaveLength(1);
    expect(f[0]).toMatchObject({ metric: 'tvGrowth', severity: 'fail' });
    expect(f[0]!.message).toMatch(/above the baseline's/);
  });

  it('accepts changes within the margin and honours a wider margin', () => {
    const slightly = withTvChange(cleanRun(), 1, 0.105);
    expect(judge(slightly, {}, base).findings.some((x) => x.kind === 'baseline-regression')).toBe(false);
    const worse = withTvChange(cleanRun(), 1, 0.115);
    expect(
      judge(worse, { baseline: { margin: 0.2 } }, base).findings.some((x) => x.kind === 'baseline-regression'),
    ).toBe(false);
  });

  it('does not call a change below the noise floor a regression when the baseline is clean', () => {
    const s = cleanRun();
    const tiny = withTvChange(s, 1, 0.5 * (s.series.tvNoise[0]! + s.series.tvNoise[1]!));
    expect(judge(tiny, {}, s).findings).toEqual([]);
  });

  it('compares variables by name and ignores variables the baseline lacks', () => {
    const worse = withTvChange(cleanRun('other'), 1, 0.5);
    expect(judge(worse, { tvGrowth: { check: 'off' } }, base).findings).toEqual([]);
  });
});

describe('judge: verdicts', () => {
  it('gives the worst verdict over several variables and one verdict per variable', () => {
    const ok = cleanRun('a');
    const warn = withTvChange(cleanRun('b'), 1, 5e-10 * 2);
    const bad = withTvChange(cleanRun('c'), 1, 1);
    const j = judge([ok, warn, bad]);
    expect(j.verdict).toBe('fail');
    expect(j.variables.map((v) => v.verdict)).toEqual(['pass', 'warn', 'fail']);
    expect(judge([ok, warn]).verdict).toBe('warn');
    expect(judge([]).verdict).toBe('pass');
  });
});
