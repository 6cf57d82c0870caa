/**
 * The tolerance bands drawn on the run page's metric charts, computed from a variable's stored
 * per-step series and the rules it was judged by. They restate the judging rules of
 * src/analysis/judge.ts (documented in docs/metrics.md) in chart form:
 *
 * - TV growth at step n >= 1 fails above max(failRelative * TV_ref, tvNoise[n-1] + tvNoise[n]),
 *   and, in smooth-profile mode, above the sampling allowance of step n-1 when that is larger;
 *   warns likewise with warnRelative. On the TV chart the band runs from TV[n-1] up to
 *   TV[n-1] + that threshold: a curve above the band is a step that failed.
 * - Mass drift fails when |drift[n]| > max(failRelative, (massNoise[0] + massNoise[n]) / massScale).
 * - Bounds: a value fails when it leaves the bounds by more than
 *   max(tolerance, relativeTolerance * (max[0] - min[0]), valueFloor[n]).
 */

export interface TvRule {
  failRelative: number;
  warnRelative: number;
  smoothProfile: boolean;
}

export interface TvSeries {
  tv: readonly number[];
  tvNoise: readonly number[];
  samplingAllowance?: readonly number[];
}

export interface TvThresholds {
  /** Rise per step above which the step fails; null at the first step (nothing to compare). */
  fail: (number | null)[];
  warn: (number | null)[];
  /** The rounding-error floor of the TV change. */
  floor: (number | null)[];
}

/** Per-step TV growth thresholds (rule in the file comment). */
export function tvGrowthThresholds(series: TvSeries, rule: TvRule, tvReference: number): TvThresholds {
  const n = series.tv.length;
  const fail: (number | null)[] = new Array(n).fill(null);
  const warn: (number | null)[] = new Array(n).fill(null);
  const floor: (number | null)[] = new Array(n).fill(null);
  for (let k = 1; k < n; k++) {
    const noise = (series.tvNoise[k - 1] ?? 0) + (series.tvNoise[k] ?? 0);
    const allowance = rule.smoothProfile ? (series.samplingAllowance?.[k - 1] ?? 0) : 0;
    const base = Math.max(noise, allowance);
    floor[k] = noise;
    fail[k] = Math.max(rule.failRelative * tvReference, base);
    warn[k] = Math.max(rule.warnRelative * tvReference, base);
  }
  return { fail, warn, floor };
}

export interface TvBand {
  /** Bottom of the band: the previous step's TV. */
  lower: (number | null)[];
  /** Top of the band: the previous step's TV plus the fail threshold. */
  upper: (number | null)[];
}

/** The band on the TV chart: [TV[n-1], TV[n-1] + fail[n]] for n >= 1; null at the first step. */
export function tvBand(tv: readonly number[], fail: readonly (number | null)[]): TvBand {
  const lower: (number | null)[] = new Array(tv.length).fill(null);
  const upper: (number | null)[] = new Array(tv.length).fill(null);
  for (let k = 1; k < tv.length; k++) {
    const previous = tv[k - 1];
    const threshold = fail[k];
    if (previous === undefined || threshold === null || threshold === undefined) continue;
    lower[k] = previous;
    upper[k] = previous + threshold;
  }
  return { lower, upper };
}

export interface DriftRule {
  failRelative: number;
  warnRelative: number;
}

/** Per-step mass-drift thresholds (relative to the mass scale); null at the first step. */
export function driftThresholds(
  massNoise: readonly number[],
  massScale: number,
  rule: DriftRule,
): { fail: (number | null)[]; warn: (number | null)[] } {
  const n = massNoise.length;
  const fail: (number | null)[] = new Array(n).fill(null);
  const warn: (number | null)[] = new Array(n).fill(null);
  const scale = massScale > 0 ? massScale : 1;
  for (let k = 1; k < n; k++) {
    const floor = ((massNoise[0] ?? 0) + (massNoise[k] ?? 0)) / scale;
    fail[k] = Math.max(rule.failRelative, floor);
    warn[k] = Math.max(rule.warnRelative, floor);
  }
  return { fail, warn };
}

export interface BoundRule {
  tolerance: number;
  relativeTolerance: number;
}

/** How far a value may leave the bounds at each step before it counts as a violation. */
export function boundTolerances(
  series: { min: readonly number[]; max: readonly number[]; valueFloor: readonly number[] },
  rule: BoundRule,
): number[] {
  const range = (series.max[0] ?? 0) - (series.min[0] ?? 0);
  const fixed = Math.max(rule.tolerance, rule.relativeTolerance * range);
  return series.valueFloor.map((floor) => Math.max(fixed, floor ?? 0));
}
