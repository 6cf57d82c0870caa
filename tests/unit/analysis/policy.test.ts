import { describe, expect, it } from 'vitest';
import { DEFAULT_POLICY, parsePolicy, policySchema, resolveRules } from '@/src/analysis/policy';

describe('policy defaults', () => {
  it('fill in the documented thresholds', () => {
    expect(DEFAULT_POLICY.tvGrowth).toMatchObject({
      check: 'fail',
      failRelative: 1e-9,
      warnRelative: 1e-10,
      smoothProfile: false,
      multiDimensional: { failRelative: 1e-2, warnRelative: 1e-9 },
      system: { failRelative: 1e-2, warnRelative: 1e-5 },
    });
    expect(DEFAULT_POLICY.newExtrema).toEqual({ check: 'fail', allow: 0 });
    expect(DEFAULT_POLICY.bounds).toEqual({ check: 'fail', tolerance: 0, relativeTolerance: 0 });
    expect(DEFAULT_POLICY.conservation).toEqual({ check: 'fail', warnRelative: 1e-8, failRelative: 1e-6 });
    expect(DEFAULT_POLICY.baseline).toEqual({ check: 'fail', margin: 0.1 });
    expect(DEFAULT_POLICY.nonFinite).toEqual({ check: 'fail' });
    expect(DEFAULT_POLICY.variables).toEqual({});
  });

  it('parse null and undefined as the default policy', () => {
    expect(parsePolicy(undefined)).toEqual(DEFAULT_POLICY);
    expect(parsePolicy(null)).toEqual(DEFAULT_POLICY);
  });

  it('keep given values and fill the rest', () => {
    const p = parsePolicy({ tvGrowth: { failRelative: 1e-6 }, baseline: { margin: 0.25 } });
    expect(p.tvGrowth.failRelative).toBe(1e-6);
    expect(p.tvGrowth.warnRelative).toBe(1e-10);
    expect(p.baseline).toEqual({ check: 'fail', margin: 0.25 });
  });
});

describe('policy validation', () => {
  it('rejects a warn threshold above the fail threshold', () => {
    expect(policySchema.safeParse({ tvGrowth: { failRelative: 1e-9, warnRelative: 1e-8 } }).success).toBe(false);
    expect(policySchema.safeParse({ conservation: { warnRelative: 1e-3 } }).success).toBe(false);
  });

  it('rejects negative tolerances, fractional extrema allowances and unknown keys', () => {
    expect(policySchema.safeParse({ bounds: { tolerance: -1 } }).success).toBe(false);
    expect(policySchema.safeParse({ newExtrema: { allow: 1.5 } }).success).toBe(false);
    expect(policySchema.safeParse({ tvGrowht: {} }).success).toBe(false);
    expect(policySchema.safeParse({ variables: { rho: { sytem: true } } }).success).toBe(false);
  });

  it('rejects a lower physical bound above the upper one', () => {
    expect(policySchema.safeParse({ variables: { c: { bounds: { lower: 1, upper: 0 } } } }).success).toBe(false);
  });

  it('does not let non-finite values be switched off', () => {
    expect(policySchema.safeParse({ nonFinite: { check: 'off' } }).success).toBe(false);
  });
});

describe('resolveRules', () => {
  const traits = { variable: 'c', dims: 1, options: {} };

  it('uses the 1D band for 1D variables, the multi-dimensional band for 2D/3D, the system band for systems', () => {
    expect(resolveRules(DEFAULT_POLICY, traits).tvGrowth).toMatchObject({
      band: 'one-dimensional',
      failRelative: 1e-9,
    });
    expect(resolveRules(DEFAULT_POLICY, { ...traits, dims: 2 }).tvGrowth).toMatchObject({
      band: 'multi-dimensional',
      failRelative: 1e-2,
    });
    expect(resolveRules(DEFAULT_POLICY, { ...traits, options: { system: true } }).tvGrowth).toMatchObject({
      band: 'system',
      warnRelative: 1e-5,
    });
  });

  it('lets a per-variable override win over the manifest options and the policy-wide values', () => {
    const policy = parsePolicy({
      variables: {
        c: {
          system: false,
          conservative: true,
          tvGrowth: { failRelative: 1e-4 },
          bounds: { upper: 2 },
          newExtrema: { allow: 3 },
        },
      },
    });
    const rules = resolveRules(policy, {
      variable: 'c',
      dims: 1,
      options: { system: true, conservative: false, bounds: { lower: 0, upper: 1 } },
    });
    expect(rules.tvGrowth).toMatchObject({ band: 'one-dimensional', failRelative: 1e-4 });
    expect(rules.conservation.check).toBe('fail');
    expect(rules.bounds).toMatchObject({ lower: 0, upper: 2 });
    expect(rules.newExtrema.allow).toBe(3);
  });

  it('turns conservation off for variables marked non-conservative', () => {
    expect(resolveRules(DEFAULT_POLICY, { ...traits, options: { conservative: false } }).conservation.check).toBe(
      'off',
    );
  });

  it('never lets a warn threshold exceed an overridden fail threshold', () => {
    const policy = parsePolicy({ variables: { c: { tvGrowth: { failRelative: 1e-12 } } } });
    expect(resolveRules(policy, traits).tvGrowth.warnRelative).toBe(1e-12);
  });

  it('leaves other variables on the policy-wide values', () => {
    const policy = parsePolicy({ variables: { other: { tvGrowth: { failRelative: 1 } } } });
    expect(resolveRules(policy, traits).tvGrowth.failRelative).toBe(1e-9);
  });
});
