import type { SummaryMetrics } from '@/src/analysis/summary';

/**
 * The metrics a maintainer compares before accepting a run as a baseline: the largest value over
 * the steps of each variable, as the analyser stored them. Pure, for the baseline panel and its
 * tests.
 */

export type KeyMetric = 'maxTvGrowthRelative' | 'maxNewExtrema' | 'maxOvershoot' | 'maxUndershoot' | 'maxMassDrift';

export const KEY_METRICS: readonly { key: KeyMetric; label: string; integer: boolean }[] = [
  { key: 'maxTvGrowthRelative', label: 'Max TV growth per step (relative)', integer: false },
  { key: 'maxNewExtrema', label: 'Max new extrema per step', integer: true },
  { key: 'maxOvershoot', label: 'Max overshoot', integer: false },
  { key: 'maxUndershoot', label: 'Max undershoot', integer: false },
  { key: 'maxMassDrift', label: 'Max mass drift (relative)', integer: false },
];

export interface VariableMetrics {
  variable: string;
  metrics: Partial<SummaryMetrics>;
}

/** How the run compares with the baseline on one metric (all metrics: smaller is better). */
export type MetricChange = 'better' | 'worse' | 'same' | 'only-run' | 'only-baseline';

export interface KeyMetricRow {
  variable: string;
  metric: KeyMetric;
  label: string;
  integer: boolean;
  baseline: number | null;
  run: number | null;
  change: MetricChange;
}

function valueOf(v: VariableMetrics | undefined, key: KeyMetric): number | null {
  const x = v?.metrics[key];
  return typeof x === 'number' && Number.isFinite(x) ? x : null;
}

export function changeOf(baseline: number | null, run: number | null): MetricChange {
  if (run === null) return 'only-baseline';
  if (baseline === null) return 'only-run';
  if (run > baseline) return 'worse';
  if (run < baseline) return 'better';
  return 'same';
}

/**
 * One row per variable and key metric, variables in the run's order, then those only the
 * baseline has. Variables match by name, as the judge matches them.
 */
export function compareKeyMetrics(
  baseline: readonly VariableMetrics[] | null,
  run: readonly VariableMetrics[],
): KeyMetricRow[] {
  const base = new Map((baseline ?? []).map((v) => [v.variable, v]));
  const names = [
    ...run.map((v) => v.variable),
    ...(baseline ?? []).map((v) => v.variable).filter((n) => !run.some((r) => r.variable === n)),
  ];
  const rows: KeyMetricRow[] = [];
  for (const name of names) {
    const b = base.get(name);
    const r = run.find((v) => v.variable === name);
    for (const m of KEY_METRICS) {
      const bv = baseline === null ? null : valueOf(b, m.key);
      const rv = valueOf(r, m.key);
      rows.push({
        variable: name,
        metric: m.key,
        label: m.label,
        integer: m.integer,
        baseline: bv,
        run: rv,
        change: baseline === null ? 'only-run' : changeOf(bv, rv),
      });
    }
  }
  return rows;
}

/** A metric for the table: integers as such, others in two-digit exponent form, '—' when absent. */
export function formatMetric(value: number | null, integer: boolean): string {
  if (value === null) return '—';
  if (integer) return String(value);
  return value === 0 ? '0' : value.toExponential(1);
}
