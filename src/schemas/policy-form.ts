import { z } from 'zod';
import { DEFAULT_POLICY, policySchema, type Policy } from '@/src/analysis/policy';
import { mergeDeep } from '@/src/lib/merge';
import { slugSchema } from './runs';

/**
 * The policy form and the policy JSON it edits. The form holds text, as people type it
 * ("1e-9", "" for "inherit"), keyed by the setting's path in the policy; these pure functions turn
 * that into a partial policy and back, and validate it with the same `policySchema` the analysis
 * uses, on the client before sending and in the action before storing.
 *
 * An empty field means "not set here": the case inherits the project's default policy and the
 * project inherits the built-in defaults (DEFAULT_POLICY). Only what is set is stored, so a case
 * follows later changes of its project's defaults.
 */

export type SettingKind = 'check' | 'number' | 'integer' | 'boolean';
export type SettingGroup = 'variable' | 'tvGrowth' | 'newExtrema' | 'bounds' | 'conservation' | 'baseline';

export interface SettingSpec {
  /** Path inside the policy (policy-wide) or inside one variable's override. */
  key: string;
  kind: SettingKind;
  group: SettingGroup;
  label: string;
  help?: string;
}

export const CHECK_CHOICES = ['fail', 'warn', 'off'] as const;

export const CHECK_LABELS: Record<(typeof CHECK_CHOICES)[number], string> = {
  fail: 'fail: a broken rule fails the run',
  warn: 'warn: a broken rule only warns',
  off: 'off: not checked',
};

export const GROUP_TITLES: Record<SettingGroup, string> = {
  variable: 'Variable',
  tvGrowth: 'Total variation growth',
  newExtrema: 'New extrema',
  bounds: 'Bounds (overshoot and undershoot)',
  conservation: 'Conservation drift',
  baseline: 'Baseline regression',
};

/** Policy-wide settings, in the order the form shows them. */
export const POLICY_SETTINGS: readonly SettingSpec[] = [
  { key: 'tvGrowth.check', kind: 'check', group: 'tvGrowth', label: 'TV growth check' },
  {
    key: 'tvGrowth.failRelative',
    kind: 'number',
    group: 'tvGrowth',
    label: '1D: fail above (relative TV increase per step)',
    help: "Increase of total variation in one step, relative to the first step's TV. The noise floor is always added.",
  },
  { key: 'tvGrowth.warnRelative', kind: 'number', group: 'tvGrowth', label: '1D: warn above (relative)' },
  {
    key: 'tvGrowth.multiDimensional.failRelative',
    kind: 'number',
    group: 'tvGrowth',
    label: '2D/3D: fail above (relative)',
  },
  {
    key: 'tvGrowth.multiDimensional.warnRelative',
    kind: 'number',
    group: 'tvGrowth',
    label: '2D/3D: warn above (relative)',
  },
  {
    key: 'tvGrowth.system.failRelative',
    kind: 'number',
    group: 'tvGrowth',
    label: 'System variables: fail above (relative)',
  },
  {
    key: 'tvGrowth.system.warnRelative',
    kind: 'number',
    group: 'tvGrowth',
    label: 'System variables: warn above (relative)',
  },
  {
    key: 'tvGrowth.smoothProfile',
    kind: 'boolean',
    group: 'tvGrowth',
    label: 'Smooth profiles',
    help: 'TV growth within the sampling allowance of a smooth profile is not a finding.',
  },
  { key: 'newExtrema.check', kind: 'check', group: 'newExtrema', label: 'New extrema check' },
  { key: 'newExtrema.allow', kind: 'integer', group: 'newExtrema', label: 'New extrema allowed per step' },
  { key: 'bounds.check', kind: 'check', group: 'bounds', label: 'Bounds check' },
  { key: 'bounds.tolerance', kind: 'number', group: 'bounds', label: 'Tolerance (absolute)' },
  {
    key: 'bounds.relativeTolerance',
    kind: 'number',
    group: 'bounds',
    label: "Tolerance (relative to the first step's range)",
  },
  { key: 'conservation.check', kind: 'check', group: 'conservation', label: 'Conservation check' },
  { key: 'conservation.warnRelative', kind: 'number', group: 'conservation', label: 'Warn above (relative drift)' },
  { key: 'conservation.failRelative', kind: 'number', group: 'conservation', label: 'Fail above (relative drift)' },
  { key: 'baseline.check', kind: 'check', group: 'baseline', label: 'Baseline check' },
  {
    key: 'baseline.margin',
    kind: 'number',
    group: 'baseline',
    label: 'Margin (fraction worse than the baseline)',
    help: "0.1: a metric may exceed the accepted baseline's by 10 % before it counts.",
  },
];

/** Settings of one variable's override, in the order the form shows them. */
export const VARIABLE_SETTINGS: readonly SettingSpec[] = [
  {
    key: 'system',
    kind: 'boolean',
    group: 'variable',
    label: 'System variable',
    help: 'A component of a nonlinear system: the looser system TV band applies.',
  },
  {
    key: 'conservative',
    kind: 'boolean',
    group: 'variable',
    label: 'Conservative',
    help: 'No: the conservation rule is off for this variable.',
  },
  { key: 'tvGrowth.check', kind: 'check', group: 'tvGrowth', label: 'TV growth check' },
  { key: 'tvGrowth.failRelative', kind: 'number', group: 'tvGrowth', label: 'TV: fail above (relative)' },
  { key: 'tvGrowth.warnRelative', kind: 'number', group: 'tvGrowth', label: 'TV: warn above (relative)' },
  { key: 'tvGrowth.smoothProfile', kind: 'boolean', group: 'tvGrowth', label: 'Smooth profile' },
  { key: 'newExtrema.check', kind: 'check', group: 'newExtrema', label: 'New extrema check' },
  { key: 'newExtrema.allow', kind: 'integer', group: 'newExtrema', label: 'New extrema allowed per step' },
  { key: 'bounds.check', kind: 'check', group: 'bounds', label: 'Bounds check' },
  {
    key: 'bounds.lower',
    kind: 'number',
    group: 'bounds',
    label: 'Physical lower bound',
    help: "Empty: the manifest's bound, else the first step's minimum.",
  },
  {
    key: 'bounds.upper',
    kind: 'number',
    group: 'bounds',
    label: 'Physical upper bound',
    help: "Empty: the manifest's bound, else the first step's maximum.",
  },
  { key: 'bounds.tolerance', kind: 'number', group: 'bounds', label: 'Bounds tolerance (absolute)' },
  { key: 'bounds.relativeTolerance', kind: 'number', group: 'bounds', label: 'Bounds tolerance (relative)' },
  { key: 'conservation.check', kind: 'check', group: 'conservation', label: 'Conservation check' },
  { key: 'conservation.warnRelative', kind: 'number', group: 'conservation', label: 'Drift: warn above (relative)' },
  { key: 'conservation.failRelative', kind: 'number', group: 'conservation', label: 'Drift: fail above (relative)' },
];

/** What the form holds: text per setting ('' = inherit), and the per-variable overrides. */
export interface PolicyFormValues {
  settings: Record<string, string>;
  variables: VariableOverrideValues[];
}

export interface VariableOverrideValues {
  name: string;
  settings: Record<string, string>;
}

/** Field errors keyed like the form's fields: `tvGrowth.failRelative`, `variables.0.bounds.lower`. */
export type FieldErrors = Record<string, string[]>;

export type PolicyFormResult =
  { ok: true; partial: Record<string, unknown>; effective: Policy } | { ok: false; fieldErrors: FieldErrors };

const settingText = z.string().max(100);

/** The form values as they travel to a server action (the action validates the policy itself). */
export const policyFormValuesSchema = z.object({
  settings: z.record(z.string().max(100), settingText),
  variables: z
    .array(z.object({ name: z.string().max(200), settings: z.record(z.string().max(100), settingText) }))
    .max(100, 'at most 100 variable overrides'),
});

/** Input of the case policy actions (preview and save). */
export const casePolicyInputSchema = z.object({
  workspace: slugSchema,
  project: slugSchema,
  case: slugSchema,
  values: policyFormValuesSchema,
  /** Save only: also re-judge the case's latest analysed run with the saved policy. */
  rejudge: z.boolean().optional(),
});
export type CasePolicyInput = z.infer<typeof casePolicyInputSchema>;

/** Input of the project settings action. */
export const projectSettingsInputSchema = z.object({
  workspace: slugSchema,
  project: slugSchema,
  name: z.string().trim().min(1, 'Enter a name.').max(100, 'At most 100 characters.'),
  defaultBranch: z
    .string()
    .trim()
    .min(1, 'Enter the default branch.')
    .max(200)
    .regex(/^[^\s~^:?*[\\]+$/, 'A branch name has no spaces or any of ~ ^ : ? * [ \\.'),
  values: policyFormValuesSchema,
});
export type ProjectSettingsInput = z.infer<typeof projectSettingsInputSchema>;

export function emptyPolicyForm(): PolicyFormValues {
  return { settings: {}, variables: [] };
}

function getPath(obj: unknown, key: string): unknown {
  let at: unknown = obj;
  for (const part of key.split('.')) {
    if (typeof at !== 'object' || at === null || Array.isArray(at)) return undefined;
    at = (at as Record<string, unknown>)[part];
  }
  return at;
}

function setPath(obj: Record<string, unknown>, key: string, value: unknown): void {
  const parts = key.split('.');
  let at = obj;
  for (const part of parts.slice(0, -1)) {
    const next = at[part];
    if (typeof next !== 'object' || next === null) at[part] = {};
    at = at[part] as Record<string, unknown>;
  }
  at[parts[parts.length - 1]!] = value;
}

/** A stored value as the form shows it: numbers as JavaScript prints them (1e-9), booleans as 'true'/'false'. */
export function settingToText(value: unknown): string {
  // Tolerances are small: "1e-6" reads better than "0.000001" (String() switches only below 1e-6).
  if (typeof value === 'number') return value !== 0 && Math.abs(value) < 1e-3 ? value.toExponential() : String(value);
  if (typeof value === 'boolean') return String(value);
  if (typeof value === 'string') return value;
  return '';
}

function readSettings(source: unknown, specs: readonly SettingSpec[]): Record<string, string> {
  const out: Record<string, string> = {};
  for (const spec of specs) {
    const text = settingToText(getPath(source, spec.key));
    if (text !== '') out[spec.key] = text;
  }
  return out;
}

/** The form's values for a stored partial policy (a case's policy or a project's default). */
export function policyToFormValues(partial: unknown): PolicyFormValues {
  const variables = getPath(partial, 'variables');
  const entries =
    typeof variables === 'object' && variables !== null && !Array.isArray(variables) ? Object.entries(variables) : [];
  return {
    settings: readSettings(partial, POLICY_SETTINGS),
    variables: entries.map(([name, override]) => ({ name, settings: readSettings(override, VARIABLE_SETTINGS) })),
  };
}

type Parsed = { value: unknown } | { error: string };

/** One field's text as a policy value; '' never reaches here (it means "inherit"). */
function parseSetting(kind: SettingKind, text: string): Parsed {
  const t = text.trim();
  if (kind === 'check') {
    return (CHECK_CHOICES as readonly string[]).includes(t) ? { value: t } : { error: 'Choose fail, warn or off.' };
  }
  if (kind === 'boolean') {
    if (t === 'true' || t === 'false') return { value: t === 'true' };
    return { error: 'Choose yes or no.' };
  }
  // Number() alone would read "0x10" and " " as numbers; accept only decimal notation.
  if (!/^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(t)) return { error: 'Enter a number, e.g. 0.5 or 1e-9.' };
  const n = Number(t);
  if (!Number.isFinite(n)) return { error: 'Enter a finite number.' };
  if (kind === 'integer' && !Number.isInteger(n)) return { error: 'Enter a whole number.' };
  return { value: n };
}

function addError(errors: FieldErrors, key: string, message: string): void {
  (errors[key] ??= []).push(message);
}

function collectSettings(
  settings: Record<string, string>,
  specs: readonly SettingSpec[],
  errorPrefix: string,
  errors: FieldErrors,
): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  for (const spec of specs) {
    const text = settings[spec.key] ?? '';
    if (text.trim() === '') continue;
    const parsed = parseSetting(spec.kind, text);
    if ('error' in parsed) addError(errors, `${errorPrefix}${spec.key}`, parsed.error);
    else setPath(out, spec.key, parsed.value);
  }
  return out;
}

function checkVariableName(name: string, index: number, seen: Set<string>, errors: FieldErrors): void {
  const key = `variables.${index}.name`;
  if (name === '') addError(errors, key, 'Name the variable (as it is called in the file).');
  else if (name.length > 200) addError(errors, key, 'At most 200 characters.');
  else if (seen.has(name.toLowerCase())) addError(errors, key, `"${name}" already has an override.`);
  seen.add(name.toLowerCase());
}

/**
 * The partial policy the form describes, and the errors of fields that are not even numbers.
 * Variable names are trimmed; they match the file's variables without regard to case, so two
 * names that differ only in case are one variable.
 */
export function formValuesToPartialPolicy(values: PolicyFormValues): {
  partial: Record<string, unknown>;
  fieldErrors: FieldErrors;
} {
  const fieldErrors: FieldErrors = {};
  const partial = collectSettings(values.settings, POLICY_SETTINGS, '', fieldErrors);
  const seen = new Set<string>();
  const variables: Record<string, unknown> = {};
  values.variables.forEach((v, index) => {
    const name = v.name.trim();
    checkVariableName(name, index, seen, fieldErrors);
    variables[name] = collectSettings(v.settings, VARIABLE_SETTINGS, `variables.${index}.`, fieldErrors);
  });
  if (values.variables.length > 0) partial.variables = variables;
  return { partial, fieldErrors };
}

// Object-level rules of policySchema report on the object; show them beside the field to change.
const REFINE_TARGETS: { pattern: RegExp; field: string }[] = [
  { pattern: /warnRelative/, field: 'warnRelative' },
  { pattern: /lower bound/, field: 'lower' },
];

function friendlyMessage(issue: z.core.$ZodIssue): string {
  if (issue.code === 'too_small' && Number(issue.minimum) === 0) return 'Must not be negative.';
  if (issue.code === 'invalid_type' && issue.expected === 'int') return 'Enter a whole number.';
  if (issue.message === 'warnRelative must not exceed failRelative')
    return 'The warn threshold must not exceed the fail threshold.';
  if (issue.message === 'lower bound must not exceed upper bound')
    return 'The lower bound must not exceed the upper bound.';
  return issue.message;
}

/** Where the form shows an issue of policySchema: variable names become row indices. */
export function issueFieldKey(path: readonly PropertyKey[], message: string, values: PolicyFormValues): string {
  const parts = path.map(String);
  if (parts[0] === 'variables' && parts.length >= 2) {
    const index = values.variables.findIndex((v) => v.name.trim() === parts[1]);
    if (index >= 0) parts.splice(0, 2, 'variables', String(index));
  }
  const target = REFINE_TARGETS.find((t) => t.pattern.test(message));
  const leaf = parts[parts.length - 1];
  if (target && leaf !== target.field) parts.push(target.field);
  return parts.join('.');
}

/**
 * Validates the form: every field must parse, and the policy that would be in effect (what is
 * inherited, with this level's settings on top) must pass `policySchema`. Returns the partial
 * policy to store and the effective policy, or the errors per field.
 */
export function validatePolicyForm(values: PolicyFormValues, inherited: unknown): PolicyFormResult {
  const { partial, fieldErrors } = formValuesToPartialPolicy(values);
  const checked = policySchema.safeParse(mergeDeep(inherited, partial));
  if (!checked.success) {
    const issues = checked.error.issues;
    for (const issue of issues.filter((i) => i.code !== 'custom'))
      addError(fieldErrors, issueFieldKey(issue.path, issue.message, values), friendlyMessage(issue));
    for (const issue of issues.filter((i) => i.code === 'custom')) {
      // A cross-field rule (warn <= fail, lower <= upper) says nothing new while one of its fields is itself wrong.
      const group = issueFieldKey(issue.path, '', values);
      if (Object.keys(fieldErrors).some((k) => k.startsWith(`${group}.`))) continue;
      addError(fieldErrors, issueFieldKey(issue.path, issue.message, values), friendlyMessage(issue));
    }
  }
  if (Object.keys(fieldErrors).length > 0 || !checked.success) return { ok: false, fieldErrors };
  return { ok: true, partial, effective: checked.data };
}

/** The policy a level inherits, with defaults filled in; the built-in defaults when it does not parse. */
export function inheritedPolicy(inherited: unknown): Policy {
  const parsed = policySchema.safeParse(mergeDeep(inherited));
  return parsed.success ? parsed.data : DEFAULT_POLICY;
}

/** The built-in default of a policy-wide setting, as text ('' when it has none). */
export function defaultText(key: string): string {
  return settingToText(getPath(DEFAULT_POLICY, key));
}

/** A setting's value in a full policy, as text. */
export function valueText(policy: Policy, key: string): string {
  return settingToText(getPath(policy, key));
}

/** How many settings a form sets (for "3 settings differ from the project default"). */
export function countSetSettings(values: PolicyFormValues): number {
  const own = Object.values(values.settings).filter((t) => t.trim() !== '').length;
  return (
    own + values.variables.reduce((n, v) => n + 1 + Object.values(v.settings).filter((t) => t.trim() !== '').length, 0)
  );
}
