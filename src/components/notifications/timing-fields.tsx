'use client';

import { useEffect } from 'react';
import { Field, SelectField } from '../ui/field';

export const DAY_NAMES = ['Sunday', 'Monday', 'Tuesday', 'Wednesday', 'Thursday', 'Friday', 'Saturday'] as const;

export type TimingFieldsProps = {
  idPrefix: string;
  day: number;
  hour: number;
  timeZone: string;
  /** When nothing was saved yet, start from the browser's time zone instead of `timeZone`. */
  preferBrowserZone: boolean;
  timeZoneListId: string;
  errors?: { digestDay?: string; digestHour?: string; timeZone?: string };
};

/** Day, hour and time zone of a weekly digest, as three labelled fields. */
export function TimingFields({
  idPrefix,
  day,
  hour,
  timeZone,
  preferBrowserZone,
  timeZoneListId,
  errors = {},
}: TimingFieldsProps) {
  const zoneId = `${idPrefix}-zone`;
  useEffect(() => {
    // The server cannot know the browser's zone; fill it in after hydration, for new settings only.
    if (!preferBrowserZone) return;
    const input = document.getElementById(zoneId);
    const browser = Intl.DateTimeFormat().resolvedOptions().timeZone;
    if (input instanceof HTMLInputElement && browser) input.value = browser;
  }, [preferBrowserZone, zoneId]);
  return (
    <div className="grid gap-3 sm:grid-cols-3">
      <SelectField
        label="Day"
        name="digestDay"
        id={`${idPrefix}-day`}
        defaultValue={String(day)}
        error={errors.digestDay}
      >
        {DAY_NAMES.map((name, i) => (
          <option key={name} value={i}>
            {name}
          </option>
        ))}
      </SelectField>
      <SelectField
        label="Hour"
        name="digestHour"
        id={`${idPrefix}-hour`}
        defaultValue={String(hour)}
        error={errors.digestHour}
      >
        {Array.from({ length: 24 }, (_, h) => (
          <option key={h} value={h}>
            {`${String(h).padStart(2, '0')}:00`}
          </option>
        ))}
      </SelectField>
      <Field
        label="Time zone"
        name="timeZone"
        id={zoneId}
        list={timeZoneListId}
        defaultValue={timeZone}
        required
        autoComplete="off"
        spellCheck={false}
        error={errors.timeZone}
        hint="A name like Europe/Oslo or America/Halifax."
      />
    </div>
  );
}

export function Checkbox({
  name,
  label,
  defaultChecked,
  id,
  hint,
}: {
  name: string;
  label: string;
  defaultChecked: boolean;
  id: string;
  hint?: string;
}) {
  return (
    <div className="flex items-start gap-2">
      <input
        type="checkbox"
        id={id}
        name={name}
        defaultChecked={defaultChecked}
        className="mt-1 h-4 w-4 rounded border-slate-300"
      />
      <label htmlFor={id} className="text-sm">
        <span className="font-medium text-slate-800 dark:text-slate-100">{label}</span>
        {hint ? <span className="block text-xs text-slate-500">{hint}</span> : null}
      </label>
    </div>
  );
}
