/**
 * Judging: turns a variable summary and a policy into findings and a verdict. It reads only the
 * stored summary (series, growth locations, first non-finite value), never the raw data, so the
 * web app can re-judge a run with an edited policy. With a baseline summary (the accepted run of
 * the case) it also flags metrics that got worse by more than the policy's margin.
 *
 * Thresholds always include the noise floor stored with each step (noise-floor.ts): a change
 * smaller than the data's own rounding error never becomes a finding, whatever the policy says.
 */
import { formatFront, formatMagnitude, formatPercent, formatRanges, formatStep, formatValue } from './format';
import {
  DEFAULT_POLICY,
  parsePolicy,
  resolveRules,
  type Policy,
  type PolicyInput,
  type VariableRules,
  type CheckLevel,
} from './policy';
import type { Finding, FindingKind, FindingLocation, Severity, Verdict, VariableSummary } from './summary';

export interface VariableJudgement {
  variable: string;
  verdict: Verdict;
  findings: number;
}

export interface Judgement {
  /** Worst verdict over the variables; 'pass' when nothing was judged. */
  verdict: Verdict;
  findings: Finding[];
  variables: VariableJudgement[];
}

/**
 * Judges one or several variable summaries with a policy (default policy when omitted) and,
 * optionally, the baseline run's summaries (matched by variable name). Rules, per variable and
 * step n >= 1 unless noted (thresholds: policy.ts; floors: noise-floor.ts):
 * - tv-growth: dTV_n > max(rel * TV_ref, tvNoise_{n-1} + tvNoise_n [, samplingAllowance_{n-1}]);
 * - new-extrema: newExtrema_n > allow;
 * - overshoot / undershoot (every step): max_n - upper or lower - min_n >
 *   max(tolerance, relativeTolerance * (max_0 - min_0), valueFloor_n);
 * - conservation-drift: |drift_n| > max(rel, (massNoise_0 + massNoise_n) / massScale);
 * - non-finite: any NaN or infinity, always fail;
 * - baseline-regression: a judged metric above baseline * (1 + margin) and above the baseline by
 *   more than its noise floor.
 * A rule with check 'warn' reports warnings at most; 'off' skips it. Verdict: 'fail' if any
 * finding fails, else 'warn' if any warns, else 'pass'.
 *
 * References: Harten 1983, "High resolution schemes for hyperbolic conservation laws"; Higham
 * 2002, "Accuracy and Stability of Numerical Algorithms" (the noise floors).
 */
export function judge(
  summary: VariableSummary | readonly VariableSummary[],
  policy: Policy | PolicyInput = DEFAULT_POLICY,
  baseline?: VariableSummary | readonly VariableSummary[] | null,
): Judgement {
  const parsed = policy === DEFAULT_POLICY ? DEFAULT_POLICY : parsePolicy(policy);
  const current = asList(summary);
  const base = baseline == null ? [] : asList(baseline);
  const findings: Finding[] = [];
  const variables: VariableJudgement[] = [];
  for (const s of current) {
    const rules = resolveRules(parsed, {
      variable: s.variable,
      dims: s.shape.filter((size) => size > 1).length,
      options: s.options,
    });
    const accepted = base.find((b) => b.variable === s.variable);
    const own = judgeVariable(s, rules, accepted);
    findings.push(...own);
    variables.push({ variable: s.variable, verdict: verdictOf(own), findings: own.length });
  }
  return { verdict: verdictOf(findings), findings, variables };
}

function asList(x: VariableSummary | readonly VariableSummary[]): readonly VariableSummary[] {
  return Array.isArray(x) ? (x as readonly VariableSummary[]) : [x as VariableSummary];
}

/**
 * Findings of one variable under resolved rules (rules and formulas: see `judge`).
 *
 * References: Harten 1983, "High resolution schemes for hyperbolic conservation laws"; Higham
 * 2002, "Accuracy and Stability of Numerical Algorithms".
 */
export function judgeVariable(s: VariableSummary, rules: VariableRules, baseline?: VariableSummary): Finding[] {
  const out: Finding[] = [];
  const push = (f: Finding | null): void => {
    if (f !== null) out.push(f);
  };
  push(nonFiniteFinding(s));
  push(tvGrowthFinding(s, rules));
  push(newExtremaFinding(s, rules));
  for (const f of boundFindings(s, rules)) out.push(f);
  push(conservationFinding(s, rules));
  if (baseline !== undefined && rules.baseline.check !== 'off') {
    for (const f of baselineFindings(s, baseline, rules)) out.push(f);
  }
  return out;
}

/**
 * Verdict of a list of findings: 'fail' if any fails, else 'warn' if any warns, else 'pass'.
 *
 * References: none (Varigate's verdict rule, docs/metrics.md).
 */
export function verdictOf(findings: readonly Finding[]): Verdict {
  if (findings.some((f) => f.severity === 'fail')) return 'fail';
  if (findings.some((f) => f.severity === 'warn')) return 'warn';
  return 'pass';
}

/** Severity of a broken fail threshold under a rule's check level. */
function failSeverity(check: CheckLevel): Severity {
  return check === 'warn' ? 'warn' : 'fail';
}

interface Hit {
  position: number;
  severity: Severity;
  magnitude: number;
  threshold: number;
}

/** Collects the steps that broke one rule and picks the first one at the worst severity. */
class Hits {
  private readonly list: Hit[] = [];
  add(position: number, severity: Severity, magnitude: number, threshold: number): void {
    this.list.push({ position, severity, magnitude, threshold });
  }
  get count(): number {
    return this.list.length;
  }
  /** First hit at the worst severity, and the hit with the largest magnitude. */
  pick(): { first: Hit; worst: Hit } | null {
    if (this.list.length === 0) return null;
    const severity: Severity = this.list.some((h) => h.severity === 'fail') ? 'fail' : 'warn';
    const first = this.list.find((h) => h.severity === severity)!;
    let worst = this.list[0]!;
    for (const h of this.list) if (h.magnitude > worst.magnitude) worst = h;
    return { first, worst };
  }
}

interface FindingParts {
  kind: FindingKind;
  /** Counts (new extrema) print as integers. */
  integer?: boolean;
  hits: Hits;
  relative: (hit: Hit) => number | null;
  location: (position: number) => FindingLocation | null;
  message: (hit: Hit, location: FindingLocation | null) => string;
}

function buildFinding(s: VariableSummary, parts: FindingParts): Finding | null {
  const picked = parts.hits.pick();
  if (picked === null) return null;
  const { first, worst } = picked;
  const location = parts.location(first.position);
  const count = parts.hits.count;
  const worstText = parts.integer === true ? String(worst.magnitude) : formatMagnitude(worst.magnitude);
  const more = count > 1 ? `; ${count} steps in all, worst ${worstText} at step ${stepAt(s, worst.position)}` : '';
  return {
    kind: parts.kind,
    severity: first.severity,
    variable: s.variable,
    step: stepAt(s, first.position),
    time: timeAt(s, first.position),
    location,
    magnitude: first.magnitude,
    relative: parts.relative(first),
    threshold: first.threshold,
    steps: count,
    worst: { step: stepAt(s, worst.position), time: timeAt(s, worst.position), magnitude: worst.magnitude },
    message: `${s.variable}: ${parts.message(first, location)}${more}`,
  };
}

function stepAt(s: VariableSummary, position: number): number {
  return s.series.index[position] ?? position;
}

function timeAt(s: VariableSummary, position: number): number | null {
  return s.series.time[position] ?? null;
}

function growthLocation(s: VariableSummary, position: number): FindingLocation | null {
  const g = s.growth.find((entry) => entry.position === position);
  if (g === undefined) return null;
  return g.front === undefined ? { ranges: g.ranges } : { ranges: g.ranges, front: g.front };
}

/** Location of a single cell given by its flat index and its cell-centre coordinates. */
function cellLocation(s: VariableSummary, cell: number, coordinates: readonly number[]): FindingLocation {
  const ranges = [];
  let rest = cell;
  for (let k = s.shape.length - 1; k >= 0; k--) {
    const size = s.shape[k]!;
    const index = size > 0 ? rest % size : 0;
    rest = size > 0 ? Math.floor(rest / size) : 0;
    // Axes of size 1 say nothing about where; leave them out unless the grid is 1D.
    if (size === 1 && s.shape.length > 1) continue;
    const at = coordinates[k] ?? 0;
    ranges.unshift({
      axis: s.axes[k]?.name ?? `axis${k}`,
      first: index,
      last: index,
      firstCoordinate: at,
      lastCoordinate: at,
    });
  }
  return { ranges };
}

function where(location: FindingLocation | null): string {
  if (location === null) return '';
  const parts = [formatRanges(location.ranges), formatFront(location.front)].filter((p) => p !== '');
  return parts.length > 0 ? `, ${parts.join(', ')}` : '';
}

function tvThresholds(s: VariableSummary, rules: VariableRules, n: number): { fail: number; warn: number } {
  const r = rules.tvGrowth;
  const noise = s.series.tvNoise;
  const floor = noise[n - 1]! + noise[n]!;
  const allowance = r.smoothProfile ? (s.series.samplingAllowance[n - 1] ?? 0) : 0;
  const base = Math.max(floor, allowance);
  return {
    fail: Math.max(r.failRelative * s.tvReference, base),
    warn: Math.max(r.warnRelative * s.tvReference, base),
  };
}

function tvGrowthFinding(s: VariableSummary, rules: VariableRules): Finding | null {
  const r = rules.tvGrowth;
  if (r.check === 'off') return null;
  const hits = new Hits();
  const change = s.series.tvChange;
  for (let n = 1; n < change.length; n++) {
    const g = change[n]!;
    const t = tvThresholds(s, rules, n);
    if (g > t.fail) hits.add(n, failSeverity(r.check), g, t.fail);
    else if (g > t.warn) hits.add(n, 'warn', g, t.warn);
  }
  return buildFinding(s, {
    kind: 'tv-growth',
    hits,
    relative: (h) => h.magnitude / s.tvReference,
    location: (p) => growthLocation(s, p),
    message: (h, loc) =>
      `TV grew by ${formatMagnitude(h.magnitude)} (${formatPercent(h.magnitude / s.tvReference)}) at ` +
      `${formatStep(stepAt(s, h.position), timeAt(s, h.position))}${where(loc)}`,
  });
}

function newExtremaFinding(s: VariableSummary, rules: VariableRules): Finding | null {
  const r = rules.newExtrema;
  if (r.check === 'off') return null;
  const hits = new Hits();
  const fresh = s.series.newExtrema;
  for (let n = 1; n < fresh.length; n++) {
    if (fresh[n]! > r.allow) hits.add(n, failSeverity(r.check), fresh[n]!, r.allow);
  }
  return buildFinding(s, {
    kind: 'new-extrema',
    integer: true,
    hits,
    relative: () => null,
    location: (p) => growthLocation(s, p),
    message: (h, loc) =>
      `${h.magnitude} new extrem${h.magnitude === 1 ? 'um' : 'a'} at ` +
      `${formatStep(stepAt(s, h.position), timeAt(s, h.position))} (allowed ${r.allow})${where(loc)}`,
  });
}

/**
 * The bounds a rule set judges by: declared physical bounds, else the first step's min and max.
 *
 * References: Harten 1983, "High resolution schemes for hyperbolic conservation laws" (the
 * range of the initial data as the bound a monotone scheme keeps).
 */
export function judgedBounds(s: VariableSummary, rules: VariableRules): { lower: number; upper: number } {
  return {
    lower: rules.bounds.lower ?? s.series.min[0] ?? 0,
    upper: rules.bounds.upper ?? s.series.max[0] ?? 0,
  };
}

function boundTolerance(s: VariableSummary, rules: VariableRules, n: number): number {
  const range = (s.series.max[0] ?? 0) - (s.series.min[0] ?? 0);
  return Math.max(rules.bounds.tolerance, rules.bounds.relativeTolerance * range, s.series.valueFloor[n] ?? 0);
}

/**
 * Extra room for a bound taken from the first step in smooth-profile mode: the sampled first
 * step's extreme may miss the profile's true extreme by up to the sampling gap.
 */
function samplingSlack(s: VariableSummary, rules: VariableRules, side: 'lower' | 'upper'): number {
  if (!rules.tvGrowth.smoothProfile) return 0;
  if ((side === 'upper' ? rules.bounds.upper : rules.bounds.lower) !== undefined) return 0;
  // Summaries stored before this field existed have no gap: no extra room.
  return s.samplingGap?.[side] ?? 0;
}

function boundFindings(s: VariableSummary, rules: VariableRules): Finding[] {
  const r = rules.bounds;
  if (r.check === 'off') return [];
  const { lower, upper } = judgedBounds(s, rules);
  const over = new Hits();
  const under = new Hits();
  const count = s.series.max.length;
  const slackUpper = samplingSlack(s, rules, 'upper');
  const slackLower = samplingSlack(s, rules, 'lower');
  for (let n = 0; n < count; n++) {
    const tol = boundTolerance(s, rules, n);
    const above = s.series.max[n]! - upper;
    const below = lower - s.series.min[n]!;
    if (above > tol + slackUpper) over.add(n, failSeverity(r.check), above, tol + slackUpper);
    if (below > tol + slackLower) under.add(n, failSeverity(r.check), below, tol + slackLower);
  }
  const range = (s.series.max[0] ?? 0) - (s.series.min[0] ?? 0);
  const sameBounds = s.bounds.lower === lower && s.bounds.upper === upper;
  const cells = (n: number): string => {
    const k = s.series.violatingCells[n] ?? 0;
    return sameBounds && k > 0 ? ` (${k} cell${k === 1 ? '' : 's'} outside the bounds)` : '';
  };
  const source = (side: 'lower' | 'upper'): string =>
    (side === 'upper' ? r.upper : r.lower) !== undefined ? 'physical' : "first step's";
  const findings = [
    buildFinding(s, {
      kind: 'overshoot',
      hits: over,
      relative: (h) => (range > 0 ? h.magnitude / range : null),
      location: (p) => cellLocation(s, s.series.argMax[p] ?? 0, s.series.argMaxCoordinates?.[p] ?? []),
      message: (h, loc) =>
        `max ${formatValue(s.series.max[h.position]!)} exceeds the ${source('upper')} upper bound ` +
        `${formatValue(upper)} by ${formatMagnitude(h.magnitude)} at ` +
        `${formatStep(stepAt(s, h.position), timeAt(s, h.position))}${where(loc)}${cells(h.position)}`,
    }),
    buildFinding(s, {
      kind: 'undershoot',
      hits: under,
      relative: (h) => (range > 0 ? h.magnitude / range : null),
      location: (p) => cellLocation(s, s.series.argMin[p] ?? 0, s.series.argMinCoordinates?.[p] ?? []),
      message: (h, loc) =>
        `min ${formatValue(s.series.min[h.position]!)} is below the ${source('lower')} lower bound ` +
        `${formatValue(lower)} by ${formatMagnitude(h.magnitude)} at ` +
        `${formatStep(stepAt(s, h.position), timeAt(s, h.position))}${where(loc)}${cells(h.position)}`,
    }),
  ];
  return findings.filter((f): f is Finding => f !== null);
}

function massFloorRelative(s: VariableSummary, n: number): number {
  return ((s.series.massNoise[0] ?? 0) + (s.series.massNoise[n] ?? 0)) / s.massScale;
}

function conservationFinding(s: VariableSummary, rules: VariableRules): Finding | null {
  const r = rules.conservation;
  if (r.check === 'off') return null;
  const hits = new Hits();
  const drift = s.series.massDrift;
  for (let n = 1; n < drift.length; n++) {
    const d = Math.abs(drift[n]!);
    const floor = massFloorRelative(s, n);
    const failAt = Math.max(r.failRelative, floor);
    const warnAt = Math.max(r.warnRelative, floor);
    if (d > failAt) hits.add(n, failSeverity(r.check), d, failAt);
    else if (d > warnAt) hits.add(n, 'warn', d, warnAt);
  }
  return buildFinding(s, {
    kind: 'conservation-drift',
    hits,
    relative: (h) => h.magnitude,
    location: () => null,
    message: (h) =>
      `mass drifted by ${formatMagnitude(h.magnitude)} relative to the first step at ` +
      `${formatStep(stepAt(s, h.position), timeAt(s, h.position))} (threshold ${formatMagnitude(h.threshold)})`,
  });
}

function nonFiniteFinding(s: VariableSummary): Finding | null {
  const nf = s.nonFinite;
  if (nf === null) return null;
  const location = cellLocation(s, nf.firstCell, nf.firstCellCoordinates ?? []);
  return {
    kind: 'non-finite',
    severity: 'fail',
    variable: s.variable,
    step: nf.firstStep,
    time: nf.firstTime,
    location,
    magnitude: nf.count,
    relative: null,
    threshold: 0,
    steps: nf.steps,
    worst: { step: nf.firstStep, time: nf.firstTime, magnitude: nf.count },
    message:
      `${s.variable}: NaN or infinite value first at ${formatStep(nf.firstStep, nf.firstTime)}` +
      `${where(location)} (${nf.count} value${nf.count === 1 ? '' : 's'} in ${nf.steps} step${nf.steps === 1 ? '' : 's'})`,
  };
}

/** A metric reduced over the run under one rule set, with the step it peaked at and its noise. */
interface RunMetric {
  name: string;
  label: string;
  value: number;
  position: number;
  /** Differences smaller than this are noise. */
  guard: number;
  /** Integer-valued metrics must grow by at least one. */
  integer: boolean;
}

/**
 * Metrics compared with the baseline, all judged under the current rules: max over steps of the
 * TV growth above its noise floor (and sampling allowance in smooth mode) relative to TV_ref, new
 * extrema per step, overshoot and undershoot beyond the value floor, and |mass drift|; each with
 * the step it peaked at and its noise floor.
 *
 * References: Higham 2002, "Accuracy and Stability of Numerical Algorithms" (the floors).
 */
export function runMetrics(s: VariableSummary, rules: VariableRules): RunMetric[] {
  const metrics: RunMetric[] = [];
  const series = s.series;
  const steps = series.tv.length;
  if (rules.tvGrowth.check !== 'off') {
    const m = peak('tvGrowth', 'max TV growth', steps, 1, (n) => {
      const noise = series.tvNoise[n - 1]! + series.tvNoise[n]!;
      const allowance = rules.tvGrowth.smoothProfile ? (series.samplingAllowance[n - 1] ?? 0) : 0;
      const excess = series.tvChange[n]! - Math.max(noise, allowance);
      return [Math.max(0, excess) / s.tvReference, noise / s.tvReference];
    });
    metrics.push(m);
  }
  if (rules.newExtrema.check !== 'off') {
    const m = peak('newExtrema', 'max new extrema per step', steps, 1, (n) => [series.newExtrema[n]!, 0]);
    metrics.push({ ...m, integer: true });
  }
  if (rules.bounds.check !== 'off') {
    const { lower, upper } = judgedBounds(s, rules);
    const slackUpper = samplingSlack(s, rules, 'upper');
    const slackLower = samplingSlack(s, rules, 'lower');
    metrics.push(
      peak('overshoot', 'max overshoot', steps, 0, (n) => [
        Math.max(0, series.max[n]! - upper - series.valueFloor[n]! - slackUpper),
        series.valueFloor[n]!,
      ]),
      peak('undershoot', 'max undershoot', steps, 0, (n) => [
        Math.max(0, lower - series.min[n]! - series.valueFloor[n]! - slackLower),
        series.valueFloor[n]!,
      ]),
    );
  }
  if (rules.conservation.check !== 'off') {
    metrics.push(
      peak('massDrift', 'max mass drift', steps, 1, (n) => [Math.abs(series.massDrift[n]!), massFloorRelative(s, n)]),
    );
  }
  return metrics;
}

function peak(
  name: string,
  label: string,
  steps: number,
  start: number,
  at: (n: number) => [value: number, noise: number],
): RunMetric {
  let value = 0;
  let position = start < steps ? start : 0;
  let guard = 0;
  for (let n = start; n < steps; n++) {
    const [v, noise] = at(n);
    if (v > value) {
      value = v;
      position = n;
    }
    if (noise > guard) guard = noise;
  }
  return { name, label, value, position, guard, integer: false };
}

function baselineFindings(s: VariableSummary, baseline: VariableSummary, rules: VariableRules): Finding[] {
  const margin = rules.baseline.margin;
  const accepted = new Map(runMetrics(baseline, rules).map((m) => [m.name, m]));
  const findings: Finding[] = [];
  for (const m of runMetrics(s, rules)) {
    const b = accepted.get(m.name);
    if (b === undefined) continue;
    const limit = b.value * (1 + margin);
    const clear = m.integer ? m.value >= b.value + 1 : m.value - b.value > Math.max(m.guard, b.guard);
    if (!(m.value > limit && clear)) continue;
    const excess = b.value > 0 ? ` is ${formatPercent(m.value / b.value - 1)} above` : ' exceeds';
    findings.push({
      kind: 'baseline-regression',
      severity: failSeverity(rules.baseline.check),
      variable: s.variable,
      step: stepAt(s, m.position),
      time: timeAt(s, m.position),
      location: m.name === 'tvGrowth' || m.name === 'newExtrema' ? growthLocation(s, m.position) : null,
      magnitude: m.value,
      relative: b.value > 0 ? m.value / b.value - 1 : null,
      threshold: limit,
      steps: 1,
      worst: { step: stepAt(s, m.position), time: timeAt(s, m.position), magnitude: m.value },
      metric: m.name,
      baseline: b.value,
      message:
        `${s.variable}: ${m.label} ${m.integer ? m.value : formatMagnitude(m.value)}${excess} the baseline's ` +
        `${m.integer ? b.value : formatMagnitude(b.value)} (margin ${formatPercent(margin)}) at ` +
        `${formatStep(stepAt(s, m.position), timeAt(s, m.position))}`,
    });
  }
  return findings;
}
