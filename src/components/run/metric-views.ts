import type { SeriesBand, SeriesLine, SeriesMarker, SeriesRule } from '@/src/components/charts/series-chart';
import { formatNumber } from '@/src/lib/chart-math';
import type { ChartSeriesView, FindingView, VariableView } from '@/src/lib/run-views';

/**
 * What each view of the metric chart draws: which columns of the chart series become lines,
 * which become tolerance bands and bound lines, and the words that explain them.
 */

export type MetricView = 'tv' | 'tv-change' | 'extrema' | 'bounds' | 'mass';

export const METRIC_VIEWS: { id: MetricView; label: string }[] = [
  { id: 'tv', label: 'Total variation' },
  { id: 'tv-change', label: 'TV change' },
  { id: 'extrema', label: 'Extrema' },
  { id: 'bounds', label: 'Min / max' },
  { id: 'mass', label: 'Mass drift' },
];

export interface LegendItem {
  label: string;
  /** Tailwind classes of the swatch (a line or a filled box). */
  swatch: string;
  shape: 'line' | 'box' | 'dot';
  dash?: 'dashed' | 'dotted';
  /** Longer explanation, shown as a tooltip. */
  title?: string;
}

export interface MetricChartSpec {
  lines: SeriesLine[];
  bands: SeriesBand[];
  rules: SeriesRule[];
  yLabel: string;
  legend: LegendItem[];
  /** One or two sentences on how to read the chart, with the numbers of the tolerance. */
  note: string;
}

const RUN = 'stroke-sky-700 dark:stroke-sky-400';
const SECOND = 'stroke-violet-600 dark:stroke-violet-400';
const BASE = 'stroke-amber-600 dark:stroke-amber-400';
const FAIL = 'stroke-red-600 dark:stroke-red-400';
const WARN = 'stroke-amber-500 dark:stroke-amber-300';
const FLOOR = 'stroke-slate-400 dark:stroke-slate-500';
const BAND = 'fill-sky-500/20 stroke-none dark:fill-sky-400/25';
const FAIL_BAND = 'fill-red-500/10 stroke-none dark:fill-red-400/15';

function baselineLine(
  baseline: ChartSeriesView | null,
  id: string,
  column: keyof ChartSeriesView['columns'],
  label: string,
): SeriesLine[] {
  if (!baseline) return [];
  return [{ id, label, values: baseline.columns[column], x: baseline.step, className: BASE, dash: 'dashed' }];
}

const baselineLegend = (baseline: ChartSeriesView | null): LegendItem[] =>
  baseline
    ? [
        {
          label: 'baseline run',
          swatch: BASE,
          shape: 'line',
          dash: 'dashed',
          title: 'The accepted baseline run of this case, at the same step numbers.',
        },
      ]
    : [];

/** Largest finite entry of a column, for quoting a threshold in words. */
function largest(values: readonly (number | null)[]): number | null {
  let m: number | null = null;
  for (const v of values) if (v !== null && (m === null || v > m)) m = v;
  return m;
}

function tvSpec(chart: ChartSeriesView, baseline: ChartSeriesView | null, variable: VariableView): MetricChartSpec {
  const rule = variable.rules.tv;
  const allowed = rule.failRelative * variable.tvReference;
  const floor = largest(chart.columns.tvFloor);
  return {
    yLabel: 'total variation',
    lines: [
      { id: 'tv', label: 'TV', values: chart.columns.tv, className: RUN },
      ...baselineLine(baseline, 'baseline-tv', 'tv', 'baseline TV'),
    ],
    bands: [{ id: 'tv-band', lower: chart.columns.tvPrevious, upper: chart.columns.tvCeiling, className: BAND }],
    rules: [],
    legend: [
      { label: 'TV of this run', swatch: RUN, shape: 'line' },
      ...baselineLegend(baseline),
      {
        label: 'allowed rise per step',
        swatch: BAND,
        shape: 'box',
        title: `From the previous step's TV up to it plus max(${formatNumber(rule.failRelative)} × TV₀, rounding floor). A point above the band is a step whose TV grew by more than that, which fails.`,
      },
      {
        label: 'finding',
        swatch: 'fill-red-600 dark:fill-red-500',
        shape: 'dot',
        title: 'Steps with findings of this variable; click to go there.',
      },
    ],
    note:
      rule.check === 'off'
        ? 'The TV-growth check is off for this variable; the band is shown for reference.'
        : `Each step may raise TV by at most ${formatNumber(allowed)} (${formatNumber(rule.failRelative)} × TV at the first step, ${formatNumber(variable.tvReference)})` +
          `${floor !== null ? `, or by the rounding floor of the two steps when that is larger (up to ${formatNumber(floor)} here)` : ''}. ` +
          (allowed < variable.tvReference * 1e-3
            ? 'That band is far thinner than a pixel here: any rise you can see failed.'
            : 'A curve above the shaded band failed.'),
  };
}

function tvChangeSpec(
  chart: ChartSeriesView,
  baseline: ChartSeriesView | null,
  variable: VariableView,
): MetricChartSpec {
  const rule = variable.rules.tv;
  return {
    yLabel: 'TV change from the previous step',
    lines: [
      { id: 'tv-change', label: 'ΔTV', values: chart.columns.tvChange, className: RUN },
      { id: 'tv-fail', label: 'fail above', values: chart.columns.tvFail, className: FAIL, dash: 'dashed' },
      { id: 'tv-warn', label: 'warn above', values: chart.columns.tvWarn, className: WARN, dash: 'dotted' },
      { id: 'tv-floor', label: 'rounding floor', values: chart.columns.tvFloor, className: FLOOR, dash: 'dotted' },
      ...baselineLine(baseline, 'baseline-tv-change', 'tvChange', 'baseline ΔTV'),
    ],
    bands: [],
    rules: [],
    legend: [
      { label: 'ΔTV of this run', swatch: RUN, shape: 'line' },
      {
        label: 'fail threshold',
        swatch: FAIL,
        shape: 'line',
        dash: 'dashed',
        title: `max(${formatNumber(rule.failRelative)} × TV₀, rounding floor of the two steps)`,
      },
      {
        label: 'warn threshold',
        swatch: WARN,
        shape: 'line',
        dash: 'dotted',
        title: `max(${formatNumber(rule.warnRelative)} × TV₀, rounding floor of the two steps)`,
      },
      {
        label: 'rounding floor',
        swatch: FLOOR,
        shape: 'line',
        dash: 'dotted',
        title: "The TV change the data's own rounding error can produce; changes below it never count.",
      },
      ...baselineLegend(baseline),
    ],
    note: 'A total-variation-diminishing scheme never raises TV, so ΔTV should stay at or below zero; points above the dashed line failed.',
  };
}

function extremaSpec(
  chart: ChartSeriesView,
  baseline: ChartSeriesView | null,
  variable: VariableView,
): MetricChartSpec {
  return {
    yLabel: 'strict local extrema',
    lines: [
      { id: 'extrema', label: 'extrema', values: chart.columns.extrema, className: RUN, steps: true },
      { id: 'new-extrema', label: 'new', values: chart.columns.newExtrema, className: SECOND, steps: true },
      ...baselineLine(baseline, 'baseline-extrema', 'extrema', 'baseline extrema'),
    ],
    bands: [],
    rules: [],
    legend: [
      { label: 'extrema', swatch: RUN, shape: 'line' },
      { label: 'new since the previous step', swatch: SECOND, shape: 'line' },
      ...baselineLegend(baseline),
    ],
    note: `Counted with the data's noise floor, plateaus once. ${variable.rules.newExtrema.allow} new extrema per step are allowed.`,
  };
}

function boundsSpec(chart: ChartSeriesView, baseline: ChartSeriesView | null, variable: VariableView): MetricChartSpec {
  const b = variable.rules.bounds;
  const { lower, upper } = chart.bounds;
  const tol = chart.columns.boundTolerance;
  const source = (s: string) => (s === 'physical' ? 'declared physical' : "first step's");
  return {
    yLabel: 'min and max of the field',
    lines: [
      { id: 'max', label: 'max', values: chart.columns.max, className: RUN },
      { id: 'min', label: 'min', values: chart.columns.min, className: SECOND },
      ...baselineLine(baseline, 'baseline-max', 'max', 'baseline max'),
      ...baselineLine(baseline, 'baseline-min', 'min', 'baseline min'),
    ],
    bands: [
      {
        id: 'upper-tolerance',
        lower: tol.map((t) => (t === null ? null : upper)),
        upper: tol.map((t) => (t === null ? null : upper + t)),
        className: FAIL_BAND,
      },
      {
        id: 'lower-tolerance',
        lower: tol.map((t) => (t === null ? null : lower - t)),
        upper: tol.map((t) => (t === null ? null : lower)),
        className: FAIL_BAND,
      },
    ],
    rules: [
      { id: 'upper', value: upper, label: 'upper bound', className: FAIL },
      { id: 'lower', value: lower, label: 'lower bound', className: FAIL },
    ],
    legend: [
      { label: 'max', swatch: RUN, shape: 'line' },
      { label: 'min', swatch: SECOND, shape: 'line' },
      {
        label: 'bounds',
        swatch: FAIL,
        shape: 'line',
        dash: 'dashed',
        title: `Upper ${formatNumber(upper)} (${source(b.upperSource)}), lower ${formatNumber(lower)} (${source(b.lowerSource)}).`,
      },
      ...baselineLegend(baseline),
    ],
    note: `Bounds: ${formatNumber(lower)} to ${formatNumber(upper)} (${source(b.lowerSource)} / ${source(b.upperSource)}). A max above the upper line or a min below the lower one by more than the tolerance is an overshoot or undershoot.`,
  };
}

function massSpec(chart: ChartSeriesView, baseline: ChartSeriesView | null, variable: VariableView): MetricChartSpec {
  const rule = variable.rules.conservation;
  const fail = chart.columns.massFail;
  return {
    yLabel: 'mass drift relative to the first step',
    lines: [
      { id: 'mass-drift', label: 'drift', values: chart.columns.massDrift, className: RUN },
      ...baselineLine(baseline, 'baseline-mass', 'massDrift', 'baseline drift'),
    ],
    bands: [{ id: 'mass-band', lower: fail.map((f) => (f === null ? null : -f)), upper: fail, className: BAND }],
    rules: [],
    legend: [
      { label: 'drift of this run', swatch: RUN, shape: 'line' },
      {
        label: 'allowed drift',
        swatch: BAND,
        shape: 'box',
        title: `±max(${formatNumber(rule.failRelative)}, rounding floor of the mass sums)`,
      },
      ...baselineLegend(baseline),
    ],
    note:
      rule.check === 'off'
        ? 'The conservation check is off for this variable (declared non-conservative, or switched off in the policy).'
        : `Sum of the field times the cell size, relative to the first step; beyond ±${formatNumber(rule.failRelative)} it fails, beyond ±${formatNumber(rule.warnRelative)} it warns.`,
  };
}

export function metricChart(
  view: MetricView,
  chart: ChartSeriesView,
  baseline: ChartSeriesView | null,
  variable: VariableView,
): MetricChartSpec {
  switch (view) {
    case 'tv':
      return tvSpec(chart, baseline, variable);
    case 'tv-change':
      return tvChangeSpec(chart, baseline, variable);
    case 'extrema':
      return extremaSpec(chart, baseline, variable);
    case 'bounds':
      return boundsSpec(chart, baseline, variable);
    case 'mass':
      return massSpec(chart, baseline, variable);
  }
}

/** One marker per step with findings of the variable, worst severity first, messages joined. */
export function findingMarkers(findings: readonly FindingView[], variable: string): SeriesMarker[] {
  const byStep = new Map<number, SeriesMarker>();
  for (const f of findings) {
    if (f.variable !== variable || f.step === null) continue;
    const seen = byStep.get(f.step);
    if (!seen) byStep.set(f.step, { x: f.step, severity: f.severity, label: f.message });
    else
      byStep.set(f.step, {
        x: f.step,
        severity: seen.severity === 'fail' || f.severity === 'fail' ? 'fail' : 'warn',
        label: `${seen.label}\n${f.message}`,
      });
  }
  return [...byStep.values()].sort((a, b) => a.x - b.x);
}
