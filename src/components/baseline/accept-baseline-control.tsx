'use client';

import { startTransition, useActionState, useRef } from 'react';
import { Button } from '@/src/components/ui/button';
import { Notice } from '@/src/components/ui/notice';
import { VerdictBadge } from '@/src/components/ui/verdict-badge';
import { acceptBaselineAction, type AcceptBaselineState } from './actions';
import { formatMetric, type KeyMetricRow } from './key-metrics';

export type AcceptBaselineControlProps = {
  workspace: string;
  project: string;
  caseName: string;
  runId: string;
  branch: string;
  /** This run's build key and verdict, for the question asked. */
  runBuildKey: string;
  runVerdict: string | null;
  /** The baseline being replaced, or null when the branch has none. */
  current: { buildKey: string; branch: string; verdict: string | null } | null;
  rows: KeyMetricRow[];
};

const changeText: Record<KeyMetricRow['change'], string> = {
  better: 'lower',
  worse: 'higher',
  same: 'same',
  'only-run': '',
  'only-baseline': 'not in this run',
};

const changeClass: Record<KeyMetricRow['change'], string> = {
  better: 'text-verdict-pass dark:text-green-400',
  worse: 'text-verdict-fail dark:text-red-400',
  same: 'text-slate-500 dark:text-slate-400',
  'only-run': 'text-slate-500',
  'only-baseline': 'text-slate-500',
};

/** The metric table of the confirmation: baseline and this run side by side, per variable. */
function ComparisonTable({ rows, hasBaseline }: { rows: KeyMetricRow[]; hasBaseline: boolean }) {
  if (rows.length === 0) return <p className="text-sm">This run has no analysed variables to compare.</p>;
  return (
    <div className="max-h-80 overflow-auto">
      <table className="w-full text-left text-sm" data-testid="baseline-comparison">
        <caption className="sr-only">Key metrics of the current baseline and of this run</caption>
        <thead className="text-xs uppercase tracking-wide text-slate-500 dark:text-slate-400">
          <tr>
            <th scope="col" className="py-1 pr-3">
              Variable
            </th>
            <th scope="col" className="py-1 pr-3">
              Metric
            </th>
            {hasBaseline ? (
              <th scope="col" className="py-1 pr-3 text-right">
                Baseline
              </th>
            ) : null}
            <th scope="col" className="py-1 pr-3 text-right">
              This run
            </th>
            {hasBaseline ? (
              <th scope="col" className="py-1">
                Change
              </th>
            ) : null}
          </tr>
        </thead>
        <tbody className="divide-y divide-slate-100 dark:divide-slate-800">
          {rows.map((r) => (
            <tr key={`${r.variable}-${r.metric}`}>
              <td className="py-1 pr-3 font-mono">{r.variable}</td>
              <td className="py-1 pr-3">{r.label}</td>
              {hasBaseline ? (
                <td className="py-1 pr-3 text-right font-mono">{formatMetric(r.baseline, r.integer)}</td>
              ) : null}
              <td className="py-1 pr-3 text-right font-mono">{formatMetric(r.run, r.integer)}</td>
              {hasBaseline ? <td className={`py-1 ${changeClass[r.change]}`}>{changeText[r.change]}</td> : null}
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

/**
 * "Accept as baseline…" for maintainers: opens a confirmation that shows what changes (the
 * current baseline's key metrics beside this run's) before anything is stored.
 */
export function AcceptBaselineControl({
  workspace,
  project,
  caseName,
  runId,
  branch,
  runBuildKey,
  runVerdict,
  current,
  rows,
}: AcceptBaselineControlProps) {
  const dialogRef = useRef<HTMLDialogElement>(null);
  const [state, accept, pending] = useActionState(async (_prev: AcceptBaselineState, input: unknown) => {
    const result = await acceptBaselineAction(input);
    if (result.ok) dialogRef.current?.close();
    return result;
  }, {});
  const titleId = `accept-baseline-title-${runId}`;

  return (
    <div className="space-y-2">
      {state.message ? <Notice tone={state.ok ? 'success' : 'error'}>{state.message}</Notice> : null}
      <Button variant="secondary" onClick={() => dialogRef.current?.showModal()}>
        Accept as baseline…
      </Button>
      <dialog
        ref={dialogRef}
        aria-labelledby={titleId}
        className="m-auto w-[min(44rem,calc(100vw-2rem))] rounded-lg border border-slate-200 bg-white p-0 text-slate-900 shadow-xl backdrop:bg-slate-900/50 dark:border-slate-700 dark:bg-slate-900 dark:text-slate-100"
      >
        <div className="space-y-4 p-5">
          <h2 id={titleId} className="text-base font-semibold">
            Make build <span className="font-mono">{runBuildKey}</span> the baseline of {caseName} on {branch}?
          </h2>
          <p className="text-sm text-slate-600 dark:text-slate-300">
            {current
              ? `It replaces the run of build ${current.buildKey}${current.branch !== branch ? ` (the ${current.branch} baseline, used while ${branch} has none)` : ''}. Later runs on ${branch} must not get worse than this run by more than the policy's margin.`
              : `${branch} has no baseline yet. Later runs on ${branch} must not get worse than this run by more than the policy's margin.`}
          </p>
          <p className="flex flex-wrap items-center gap-2 text-sm" data-testid="baseline-verdicts">
            {current ? (
              <>
                Baseline build <span className="font-mono">{current.buildKey}</span>{' '}
                <VerdictBadge verdict={current.verdict} />
                <span aria-hidden>→</span>
              </>
            ) : null}
            This run, build <span className="font-mono">{runBuildKey}</span> <VerdictBadge verdict={runVerdict} />
          </p>
          <ComparisonTable rows={rows} hasBaseline={current !== null} />
          {state.message && !state.ok ? <Notice tone="error">{state.message}</Notice> : null}
          <div className="flex flex-wrap justify-end gap-2">
            <Button variant="secondary" autoFocus onClick={() => dialogRef.current?.close()}>
              Cancel
            </Button>
            <Button
              disabled={pending}
              onClick={() => startTransition(() => accept({ workspace, project, case: caseName, runId, branch }))}
            >
              {pending ? 'Accepting…' : 'Accept as baseline'}
            </Button>
          </div>
        </div>
      </dialog>
    </div>
  );
}
