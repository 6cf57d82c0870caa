import { describe, expect, it } from 'vitest';
import { DEFAULT_POLICY, parsePolicy } from '@/src/analysis/policy';
import {
  POLICY_SETTINGS,
  VARIABLE_SETTINGS,
  countSetSettings,
  defaultText,
  emptyPolicyForm,
  formValuesToPartialPolicy,
  inheritedPolicy,
  issueFieldKey,
  policyToFormValues,
  validatePolicyForm,
  type PolicyFormValues,
} from '@/src/schemas/policy-form';

const form = (settings: Record<string, string>, variables: PolicyFormValues['variables'] = []): PolicyFormValues => ({
  settings,
  variables,
});

describe('policy form <-> policy', () => {
  it('an empty form stores an empty policy, so every setting keeps inheriting', () => {
    const result = validatePolicyForm(emptyPolicyForm(), {});
    expect(result).toEqual({ ok: true, partial: {}, effective: DEFAULT_POLICY });
  });

  it('turns typed text into numbers, booleans and check levels at their policy paths', () => {
    const { partial, fieldErrors } = formValuesToPartialPolicy(
      form({
        'tvGrowth.check': 'off',
        'tvGrowth.failRelative': '1e-6',
        'tvGrowth.smoothProfile': 'true',
        'newExtrema.allow': ' 100 ',
        'bounds.check': 'off',
      }),
    );
    expect(fieldErrors).toEqual({});
    expect(partial).toEqual({
      tvGrowth: { check: 'off', failRelative: 1e-6, smoothProfile: true },
      newExtrema: { allow: 100 },
      bounds: { check: 'off' },
    });
  });

  it('reads a stored partial policy back into the same form values (round trip)', () => {
    const stored = {
      tvGrowth: { failRelative: 1e-6, warnRelative: 1e-7, multiDimensional: { failRelative: 0.05 } },
      conservation: { check: 'warn' },
      variables: { salinity: { system: true, bounds: { lower: 0, upper: 40 }, newExtrema: { allow: 2 } } },
    };
    const values = policyToFormValues(stored);
    expect(values.settings).toEqual({
      'tvGrowth.failRelative': '1e-6',
      'tvGrowth.warnRelative': '1e-7',
      'tvGrowth.multiDimensional.failRelative': '0.05',
      'conservation.check': 'warn',
    });
    expect(values.variables).toEqual([
      {
        name: 'salinity',
        settings: { system: 'true', 'bounds.lower': '0', 'bounds.upper': '40', 'newExtrema.allow': '2' },
      },
    ]);
    const back = validatePolicyForm(values, {});
    expect(back.ok && back.partial).toEqual(stored);
  });

  it('keeps per-variable overrides with physical bounds and the system flag, names trimmed', () => {
    const result = validatePolicyForm(
      form({}, [{ name: ' rho ', settings: { system: 'true', conservative: 'false', 'bounds.lower': '0' } }]),
      {},
    );
    expect(result.ok).toBe(true);
    if (!result.ok) return;
    expect(result.partial).toEqual({ variables: { rho: { system: true, conservative: false, bounds: { lower: 0 } } } });
    expect(result.effective.variables.rho).toEqual({ system: true, conservative: false, bounds: { lower: 0 } });
  });

  it('validates what would be in effect: a case warn threshold above the project fail threshold is refused', () => {
    const project = { tvGrowth: { failRelative: 1e-6 } };
    expect(validatePolicyForm(form({ 'tvGrowth.warnRelative': '1e-7' }), project).ok).toBe(true);
    const refused = validatePolicyForm(form({ 'tvGrowth.warnRelative': '1e-5' }), project);
    expect(refused.ok).toBe(false);
    if (refused.ok) return;
    expect(refused.fieldErrors['tvGrowth.warnRelative']).toEqual([
      'The warn threshold must not exceed the fail threshold.',
    ]);
  });

  it('the effective policy layers defaults < project < case, as the analysis job does', () => {
    const result = validatePolicyForm(form({ 'newExtrema.allow': '3' }), {
      newExtrema: { check: 'warn' },
      baseline: { margin: 0.2 },
    });
    expect(result.ok && result.effective).toEqual(
      parsePolicy({ newExtrema: { check: 'warn', allow: 3 }, baseline: { margin: 0.2 } }),
    );
  });
});

describe('policy form errors', () => {
  it('refuses text that is not a number, fractions where a count is asked, and negative tolerances, per field', () => {
    const result = validatePolicyForm(
      form({
        'tvGrowth.failRelative': 'abc',
        'newExtrema.allow': '1.5',
        'bounds.tolerance': '-1',
        'conservation.failRelative': '0x10',
      }),
      {},
    );
    expect(result.ok).toBe(false);
    if (result.ok) return;
    expect(result.fieldErrors['tvGrowth.failRelative']).toEqual(['Enter a number, e.g. 0.5 or 1e-9.']);
    expect(result.fieldErrors['newExtrema.allow']).toEqual(['Enter a whole number.']);
    expect(result.fieldErrors['bounds.tolerance']).toEqual(['Must not be negative.']);
    expect(result.fieldErrors['conservation.failRelative']).toEqual(['Enter a number, e.g. 0.5 or 1e-9.']);
  });

  it('keys variable errors by row, so renaming a row keeps its errors in place', () => {
    const values = form({}, [
      { name: 'c', settings: {} },
      { name: 'rho', settings: { 'bounds.lower': '2', 'bounds.upper': '1', 'newExtrema.allow': '-1' } },
    ]);
    const result = validatePolicyForm(values, {});
    expect(result.ok).toBe(false);
    if (result.ok) return;
    expect(result.fieldErrors['variables.1.bounds.lower']).toEqual([
      'The lower bound must not exceed the upper bound.',
    ]);
    expect(result.fieldErrors['variables.1.newExtrema.allow']).toEqual(['Must not be negative.']);
  });

  it('refuses empty and repeated variable names (names match without regard to case)', () => {
    const result = validatePolicyForm(
      form({}, [
        { name: 'Rho', settings: {} },
        { name: 'rho', settings: {} },
        { name: '  ', settings: {} },
      ]),
      {},
    );
    expect(result.ok).toBe(false);
    if (result.ok) return;
    expect(result.fieldErrors['variables.1.name']).toEqual(['"rho" already has an override.']);
    expect(result.fieldErrors['variables.2.name']?.[0]).toMatch(/Name the variable/);
    expect(result.fieldErrors['variables.0.name']).toBeUndefined();
  });

  it('ignores keys it does not know instead of storing them', () => {
    const { partial } = formValuesToPartialPolicy(form({ 'nonFinite.check': 'off', 'made.up': '1' }));
    expect(partial).toEqual({});
  });

  it('maps object-level issues to the field a person would change', () => {
    const values = form({}, [{ name: 'a.b', settings: {} }]);
    expect(issueFieldKey(['conservation'], 'warnRelative must not exceed failRelative', values)).toBe(
      'conservation.warnRelative',
    );
    expect(issueFieldKey(['variables', 'a.b', 'bounds'], 'lower bound must not exceed upper bound', values)).toBe(
      'variables.0.bounds.lower',
    );
    expect(issueFieldKey(['bounds', 'tolerance'], 'Too small', values)).toBe('bounds.tolerance');
  });
});

describe('policy form display helpers', () => {
  it('shows every numeric setting with a built-in default', () => {
    for (const spec of POLICY_SETTINGS) expect(defaultText(spec.key), spec.key).not.toBe('');
    expect(defaultText('tvGrowth.failRelative')).toBe('1e-9');
    expect(defaultText('baseline.margin')).toBe('0.1');
  });

  it('offers every override field of the schema', () => {
    const keys = VARIABLE_SETTINGS.map((s) => s.key);
    for (const k of [
      'system',
      'conservative',
      'bounds.lower',
      'bounds.upper',
      'tvGrowth.check',
      'newExtrema.allow',
      'conservation.check',
    ])
      expect(keys).toContain(k);
  });

  it('falls back to the built-in defaults when an inherited policy does not parse', () => {
    expect(inheritedPolicy({ tvGrowth: { failRelative: -1 } })).toEqual(DEFAULT_POLICY);
    expect(inheritedPolicy({ tvGrowth: { failRelative: 1e-3 } }).tvGrowth.failRelative).toBe(1e-3);
  });

  it('counts the settings a level sets', () => {
    expect(
      countSetSettings(
        form({ 'bounds.check': 'off', 'tvGrowth.failRelative': ' ' }, [{ name: 'c', settings: { system: 'true' } }]),
      ),
    ).toBe(3);
  });
});
