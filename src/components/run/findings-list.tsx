'use client';

import type { FindingView } from '@/src/lib/run-views';

export type FindingsListProps = {
  findings: FindingView[];
  activeId: string | null;
  onSelect: (finding: FindingView) => void;
};

const kindLabel: Record<string, string> = {
  'tv-growth': 'TV growth',
  'new-extrema': 'new extrema',
  overshoot: 'overshoot',
  undershoot: 'undershoot',
  'conservation-drift': 'mass drift',
  'non-finite': 'NaN / infinity',
  'baseline-regression': 'worse than baseline',
};

/** The findings in words; each one moves the charts to its variable, step and cells. */
export function FindingsList({ findings, activeId, onSelect }: FindingsListProps) {
  if (findings.length === 0) {
    return (
      <p className="text-sm text-slate-600 dark:text-slate-400" data-testid="no-findings">
        No findings: every enabled check stayed within its tolerance at every step.
      </p>
    );
  }
  return (
    <ul className="space-y-2" aria-label="Findings">
      {findings.map((f) => {
        const active = f.id === activeId;
        return (
          <li key={f.id}>
            <button
              type="button"
              data-testid="finding"
              aria-pressed={active}
              onClick={() => onSelect(f)}
              className={`w-full rounded-md border px-3 py-2 text-left text-sm focus-visible:outline-2 focus-visible:outline-offset-2 focus-visible:outline-sky-600 ${
                active
                  ? 'border-sky-500 bg-sky-50 dark:border-sky-400 dark:bg-sky-950'
                  : 'border-slate-200 hover:bg-slate-50 dark:border-slate-800 dark:hover:bg-slate-800/60'
              }`}
            >
              <span className="flex flex-wrap items-center gap-2 text-xs">
                <span
                  className={`rounded px-1.5 py-0.5 font-semibold uppercase tracking-wide ${
                    f.severity === 'fail'
                      ? 'bg-red-100 text-red-900 dark:bg-red-950 dark:text-red-200'
                      : 'bg-amber-100 text-amber-900 dark:bg-amber-950 dark:text-amber-200'
                  }`}
                >
                  {f.severity}
                </span>
                <span className="text-slate-600 dark:text-slate-400">{kindLabel[f.kind] ?? f.kind}</span>
                {f.step !== null ? <span className="ml-auto text-slate-500">step {f.step}</span> : null}
              </span>
              <span className="mt-1 block break-words" data-testid="finding-message">
                {f.message}
              </span>
            </button>
          </li>
        );
      })}
    </ul>
  );
}
