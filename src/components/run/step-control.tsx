'use client';

import { useId } from 'react';
import { stepLabel } from '@/src/lib/chart-math';

export type StepControlProps = {
  steps: number[];
  times: (number | null)[];
  position: number;
  onChange: (position: number) => void;
};

/** The labelled step slider with previous/next buttons; arrow keys work on the slider itself. */
export function StepControl({ steps, times, position, onChange }: StepControlProps) {
  const id = useId();
  const count = steps.length;
  const step = steps[position] ?? 0;
  const label = stepLabel(step, times[position]);
  const button =
    'rounded-md border border-slate-300 px-2 py-1 text-sm hover:bg-slate-50 disabled:opacity-40 dark:border-slate-700 dark:hover:bg-slate-800 focus-visible:outline-2 focus-visible:outline-offset-2 focus-visible:outline-sky-600';
  return (
    <div className="flex flex-wrap items-center gap-x-3 gap-y-2">
      <label htmlFor={id} className="text-sm font-medium">
        Step
      </label>
      <button
        type="button"
        className={button}
        onClick={() => onChange(position - 1)}
        disabled={position <= 0}
        aria-label="Previous step"
      >
        ←
      </button>
      <input
        id={id}
        type="range"
        min={0}
        max={Math.max(0, count - 1)}
        step={1}
        value={position}
        onChange={(e) => onChange(Number(e.target.value))}
        aria-valuetext={`${label} (${position + 1} of ${count})`}
        className="min-w-32 flex-1 accent-sky-600"
        data-testid="step-slider"
      />
      <button
        type="button"
        className={button}
        onClick={() => onChange(position + 1)}
        disabled={position >= count - 1}
        aria-label="Next step"
      >
        →
      </button>
      <output htmlFor={id} className="min-w-40 text-sm tabular-nums" data-testid="step-label" aria-live="polite">
        {label}{' '}
        <span className="text-slate-500">
          ({position + 1} of {count})
        </span>
      </output>
    </div>
  );
}
