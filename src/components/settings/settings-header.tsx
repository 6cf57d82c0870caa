import type { ReactNode } from 'react';

export function SettingsHeader({ title, children }: { title: string; children?: ReactNode }) {
  return (
    <header>
      <h1 className="text-2xl font-semibold tracking-tight">{title}</h1>
      {children ? <p className="mt-1 max-w-3xl text-sm text-slate-600 dark:text-slate-300">{children}</p> : null}
    </header>
  );
}
