'use client';

import { useId, useState, type KeyboardEvent, type ReactNode } from 'react';
import type { Policy } from '@/src/analysis/policy';
import {
  CHECK_CHOICES,
  CHECK_LABELS,
  GROUP_TITLES,
  POLICY_SETTINGS,
  VARIABLE_SETTINGS,
  defaultText,
  valueText,
  type FieldErrors,
  type PolicyFormValues,
  type SettingGroup,
  type SettingSpec,
} from '@/src/schemas/policy-form';
import { Button } from '@/src/components/ui/button';

export type PolicyFieldsProps = {
  /** 'case' settings sit on the project's default policy; 'project' settings on the built-in defaults. */
  level: 'case' | 'project';
  values: PolicyFormValues;
  onChange: (values: PolicyFormValues) => void;
  /** What applies where a field is left empty (defaults and, for a case, the project's settings). */
  inherited: Policy;
  errors: FieldErrors;
  readOnly: boolean;
};

const inputClass =
  'mt-1 block w-full rounded-md border border-slate-300 bg-white px-2.5 py-1.5 text-sm text-slate-900 shadow-sm placeholder:text-slate-400 focus:border-sky-600 focus:outline-none focus:ring-1 focus:ring-sky-600 disabled:bg-slate-100 disabled:text-slate-600 aria-[invalid=true]:border-verdict-fail dark:border-slate-700 dark:bg-slate-900 dark:text-slate-100 dark:placeholder:text-slate-500 dark:disabled:bg-slate-800 dark:disabled:text-slate-300';

const POLICY_GROUPS: SettingGroup[] = ['tvGrowth', 'newExtrema', 'bounds', 'conservation', 'baseline'];

function domId(prefix: string, key: string): string {
  return `${prefix}-${key.replace(/[^A-Za-z0-9]+/g, '-')}`;
}

function boolWord(text: string): string {
  return text === 'true' ? 'yes' : text === 'false' ? 'no' : text;
}

/** "default 1e-9 · project 1e-8": where an empty field's value comes from. */
function inheritedHint(
  level: PolicyFieldsProps['level'],
  key: string,
  inherited: Policy,
  kind: SettingSpec['kind'],
): string {
  const builtIn = defaultText(key);
  const current = valueText(inherited, key);
  const show = kind === 'boolean' ? boolWord : (t: string) => t;
  const parts = [`Default ${show(builtIn)}`];
  if (level === 'case' && current !== builtIn) parts.push(`project ${show(current)}`);
  return parts.join(' · ');
}

type SettingInputProps = {
  id: string;
  spec: SettingSpec;
  value: string;
  onChange: (text: string) => void;
  /** What applies when the field is empty, in words. */
  inheritedText: string;
  hint?: ReactNode;
  error?: string[];
  readOnly: boolean;
};

/** One setting: a select for checks and yes/no, a text box for numbers ('' = inherit). */
function SettingInput({ id, spec, value, onChange, inheritedText, hint, error, readOnly }: SettingInputProps) {
  const describedBy = [hint ? `${id}-hint` : null, error ? `${id}-error` : null].filter(Boolean).join(' ') || undefined;
  const common = {
    id,
    name: id,
    disabled: readOnly,
    'aria-invalid': error ? true : undefined,
    'aria-describedby': describedBy,
    className: inputClass,
  } as const;
  let control: ReactNode;
  if (spec.kind === 'check') {
    control = (
      <select {...common} value={value} onChange={(e) => onChange(e.target.value)}>
        <option value="">Inherit ({inheritedText})</option>
        {CHECK_CHOICES.map((c) => (
          <option key={c} value={c}>
            {CHECK_LABELS[c]}
          </option>
        ))}
      </select>
    );
  } else if (spec.kind === 'boolean') {
    control = (
      <select {...common} value={value} onChange={(e) => onChange(e.target.value)}>
        <option value="">Inherit ({inheritedText})</option>
        <option value="true">yes</option>
        <option value="false">no</option>
      </select>
    );
  } else {
    control = (
      <input
        {...common}
        type="text"
        inputMode={spec.kind === 'integer' ? 'numeric' : 'decimal'}
        autoComplete="off"
        spellCheck={false}
        placeholder={inheritedText}
        value={value}
        onChange={(e) => onChange(e.target.value)}
      />
    );
  }
  return (
    <div>
      <label htmlFor={id} className="block text-sm font-medium text-slate-700 dark:text-slate-200">
        {spec.label}
      </label>
      {control}
      {hint ? (
        <p id={`${id}-hint`} className="mt-1 text-xs text-slate-500 dark:text-slate-400">
          {hint}
        </p>
      ) : null}
      {error ? (
        <p id={`${id}-error`} className="mt-1 text-xs text-verdict-fail dark:text-red-400">
          {error.join(' ')}
        </p>
      ) : null}
    </div>
  );
}

function Group({ title, children, error }: { title: string; children: ReactNode; error?: string[] }) {
  return (
    <fieldset className="rounded-lg border border-slate-200 p-3 dark:border-slate-800">
      <legend className="px-1 text-sm font-semibold text-slate-800 dark:text-slate-100">{title}</legend>
      {error ? <p className="mb-2 text-xs text-verdict-fail dark:text-red-400">{error.join(' ')}</p> : null}
      <div className="grid gap-3 sm:grid-cols-2 lg:grid-cols-3">{children}</div>
    </fieldset>
  );
}

function withSetting(settings: Record<string, string>, key: string, text: string): Record<string, string> {
  const next = { ...settings };
  if (text === '') delete next[key];
  else next[key] = text;
  return next;
}

/**
 * The policy's fields, grouped by rule, and the per-variable overrides. Controlled: the parent
 * keeps the values, validates them and talks to the server. An empty field inherits (the hint
 * under it says from where); the built-in default is always shown.
 */
export function PolicyFields({ level, values, onChange, inherited, errors, readOnly }: PolicyFieldsProps) {
  const prefix = useId().replace(/:/g, '');
  const setPolicySetting = (key: string, text: string) =>
    onChange({ ...values, settings: withSetting(values.settings, key, text) });
  return (
    <div className="space-y-4">
      {POLICY_GROUPS.map((group) => (
        <Group key={group} title={GROUP_TITLES[group]} error={errors[group]}>
          {POLICY_SETTINGS.filter((s) => s.group === group).map((spec) => {
            const inheritedValue = valueText(inherited, spec.key);
            return (
              <SettingInput
                key={spec.key}
                id={domId(`${prefix}-policy`, spec.key)}
                spec={spec}
                value={values.settings[spec.key] ?? ''}
                onChange={(text) => setPolicySetting(spec.key, text)}
                inheritedText={spec.kind === 'boolean' ? boolWord(inheritedValue) : inheritedValue}
                hint={
                  <>
                    {inheritedHint(level, spec.key, inherited, spec.kind)}
                    {spec.help ? <span className="block">{spec.help}</span> : null}
                  </>
                }
                error={errors[spec.key]}
                readOnly={readOnly}
              />
            );
          })}
        </Group>
      ))}
      <p className="text-sm text-slate-600 dark:text-slate-300">
        <strong className="font-semibold">Non-finite values</strong> (NaN, infinity) always fail; no policy switches
        that off.
      </p>
      <VariableOverrides values={values} onChange={onChange} errors={errors} readOnly={readOnly} prefix={prefix} />
    </div>
  );
}

type VariableOverridesProps = {
  values: PolicyFormValues;
  onChange: (values: PolicyFormValues) => void;
  errors: FieldErrors;
  readOnly: boolean;
  prefix: string;
};

function variableHint(spec: SettingSpec): string {
  if (spec.help) return spec.help;
  if (spec.key.startsWith('tvGrowth.') && spec.kind === 'number')
    return "Empty: the band of the variable's class (1D, 2D/3D or system).";
  return 'Empty: the policy-wide setting.';
}

/** Overrides for named variables: add a name, set what differs, remove it again. */
function VariableOverrides({ values, onChange, errors, readOnly, prefix }: VariableOverridesProps) {
  const [newName, setNewName] = useState('');
  const [addError, setAddError] = useState<string | null>(null);
  const addId = `${prefix}-new-variable`;

  const add = () => {
    const name = newName.trim();
    if (name === '') return setAddError('Type the variable name first.');
    if (values.variables.some((v) => v.name.trim().toLowerCase() === name.toLowerCase()))
      return setAddError(`"${name}" already has an override.`);
    setAddError(null);
    setNewName('');
    onChange({ ...values, variables: [...values.variables, { name, settings: {} }] });
  };
  const onKeyDown = (e: KeyboardEvent<HTMLInputElement>) => {
    // Enter adds the variable instead of submitting the whole form.
    if (e.key === 'Enter') {
      e.preventDefault();
      add();
    }
  };
  const update = (index: number, next: { name?: string; settings?: Record<string, string> }) =>
    onChange({ ...values, variables: values.variables.map((v, i) => (i === index ? { ...v, ...next } : v)) });
  const remove = (index: number) => onChange({ ...values, variables: values.variables.filter((_, i) => i !== index) });

  return (
    <section aria-labelledby={`${prefix}-variables-title`} className="space-y-3">
      <h3 id={`${prefix}-variables-title`} className="text-sm font-semibold text-slate-800 dark:text-slate-100">
        Per-variable overrides
      </h3>
      <p className="text-xs text-slate-500 dark:text-slate-400">
        Physical bounds, the system-variable flag and rules for one variable of the file (matched by name, ignoring
        case). They win over the upload&apos;s manifest and over the settings above.
      </p>
      {values.variables.length === 0 ? (
        <p className="text-sm text-slate-500 dark:text-slate-400">No variable overrides.</p>
      ) : null}
      {values.variables.map((v, index) => {
        const rowPrefix = `${prefix}-var-${index}`;
        const label = v.name.trim() || `variable ${index + 1}`;
        return (
          <fieldset
            key={index}
            className="rounded-lg border border-slate-200 p-3 dark:border-slate-800"
            data-testid="variable-override"
          >
            <legend className="px-1 text-sm font-semibold text-slate-800 dark:text-slate-100">Variable {label}</legend>
            <div className="mb-3 flex flex-wrap items-end gap-3">
              <div className="min-w-48 flex-1">
                <label
                  htmlFor={`${rowPrefix}-name`}
                  className="block text-sm font-medium text-slate-700 dark:text-slate-200"
                >
                  Variable name
                </label>
                <input
                  id={`${rowPrefix}-name`}
                  className={inputClass}
                  value={v.name}
                  disabled={readOnly}
                  onChange={(e) => update(index, { name: e.target.value })}
                  aria-invalid={errors[`variables.${index}.name`] ? true : undefined}
                  aria-describedby={errors[`variables.${index}.name`] ? `${rowPrefix}-name-error` : undefined}
                />
                {errors[`variables.${index}.name`] ? (
                  <p id={`${rowPrefix}-name-error`} className="mt-1 text-xs text-verdict-fail dark:text-red-400">
                    {errors[`variables.${index}.name`]!.join(' ')}
                  </p>
                ) : null}
              </div>
              {readOnly ? null : (
                <Button
                  variant="secondary"
                  onClick={() => remove(index)}
                  aria-label={`Remove the override of ${label}`}
                >
                  Remove
                </Button>
              )}
            </div>
            {errors[`variables.${index}.bounds`] ? (
              <p className="mb-2 text-xs text-verdict-fail">{errors[`variables.${index}.bounds`]!.join(' ')}</p>
            ) : null}
            <div className="grid gap-3 sm:grid-cols-2 lg:grid-cols-3">
              {VARIABLE_SETTINGS.map((spec) => (
                <SettingInput
                  key={spec.key}
                  id={domId(rowPrefix, spec.key)}
                  spec={spec}
                  value={v.settings[spec.key] ?? ''}
                  onChange={(text) => update(index, { settings: withSetting(v.settings, spec.key, text) })}
                  inheritedText={
                    spec.key.startsWith('bounds.lower') || spec.key.startsWith('bounds.upper')
                      ? 'none declared'
                      : 'policy-wide'
                  }
                  hint={variableHint(spec)}
                  error={errors[`variables.${index}.${spec.key}`]}
                  readOnly={readOnly}
                />
              ))}
            </div>
          </fieldset>
        );
      })}
      {readOnly ? null : (
        <div className="flex flex-wrap items-end gap-2">
          <div className="min-w-48 flex-1 sm:max-w-xs">
            <label htmlFor={addId} className="block text-sm font-medium text-slate-700 dark:text-slate-200">
              Add an override for variable
            </label>
            <input
              id={addId}
              className={inputClass}
              value={newName}
              placeholder="e.g. salinity"
              onChange={(e) => setNewName(e.target.value)}
              onKeyDown={onKeyDown}
              aria-invalid={addError ? true : undefined}
              aria-describedby={addError ? `${addId}-error` : undefined}
            />
            {addError ? (
              <p id={`${addId}-error`} className="mt-1 text-xs text-verdict-fail dark:text-red-400">
                {addError}
              </p>
            ) : null}
          </div>
          <Button variant="secondary" onClick={add}>
            Add variable
          </Button>
        </div>
      )}
    </section>
  );
}
