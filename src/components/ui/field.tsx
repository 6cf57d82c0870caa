import type { InputHTMLAttributes, ReactNode, SelectHTMLAttributes } from 'react';

export type FieldProps = InputHTMLAttributes<HTMLInputElement> & { label: string; error?: string; hint?: ReactNode };

const inputClass =
  'mt-1 block w-full rounded-md border border-slate-300 bg-white px-2.5 py-1.5 text-sm text-slate-900 shadow-sm focus:border-sky-600 focus:outline-none focus:ring-1 focus:ring-sky-600 dark:border-slate-700 dark:bg-slate-900 dark:text-slate-100';

/** A labelled input with its error below; the error is tied to the input for screen readers. */
export function Field({ label, error, hint, id, name, className = '', ...props }: FieldProps) {
  const inputId = id ?? `field-${name}`;
  return (
    <div className={className}>
      <label htmlFor={inputId} className="block text-sm font-medium text-slate-700 dark:text-slate-200">
        {label}
      </label>
      <input
        id={inputId}
        name={name}
        aria-invalid={error ? true : undefined}
        aria-describedby={error ? `${inputId}-error` : undefined}
        className={inputClass}
        {...props}
      />
      {hint && !error ? <p className="mt-1 text-xs text-slate-500">{hint}</p> : null}
      {error ? (
        <p id={`${inputId}-error`} className="mt-1 text-xs text-verdict-fail">
          {error}
        </p>
      ) : null}
    </div>
  );
}

export type SelectFieldProps = SelectHTMLAttributes<HTMLSelectElement> & { label: string; error?: string };

export function SelectField({ label, error, id, name, children, className = '', ...props }: SelectFieldProps) {
  const inputId = id ?? `field-${name}`;
  return (
    <div className={className}>
      <label htmlFor={inputId} className="block text-sm font-medium text-slate-700 dark:text-slate-200">
        {label}
      </label>
      <select id={inputId} name={name} className={inputClass} aria-invalid={error ? true : undefined} {...props}>
        {children}
      </select>
      {error ? <p className="mt-1 text-xs text-verdict-fail">{error}</p> : null}
    </div>
  );
}
