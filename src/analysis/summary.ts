/**
 * The plain-object result of analysing one variable: per-step series (plain number arrays), where
 * TV grew, the first non-finite value, summary metrics, and the findings of the policy it was
 * judged with. It is JSON-serialisable as is (no typed arrays, no NaN or Infinity: times that the
 * input lacks are null, sums that overflow saturate at +-Number.MAX_VALUE), and it holds
 * everything `judge` needs, so a run can be re-judged with another policy without its raw data.
 */
import type { FrontRelation } from './localise';
import type { Precision, VariableOptions } from './types';

export const SUMMARY_VERSION = 1;

export interface AxisSummary {
  name: string;
  size: number;
  periodic: boolean;
}

/** Series with one entry per pushed step, in push order. */
export interface StepSeries {
  /** Step number as written by the solver. */
  index: number[];
  /** Simulation time; null where the input gave none. */
  time: (number | null)[];
  /** Total variation (sum over axes, wrap-around terms on periodic axes). */
  tv: number[];
  /** tv[n] - tv[n-1]; 0 at the first step. */
  tvChange: number[];
  /** tvChange / tvReference. */
  tvChangeRelative: number[];
  /** Rounding-error bound of tv[n]; the floor of tvChange[n] is tvNoise[n-1] + tvNoise[n]. */
  tvNoise: number[];
  /**
   * Smooth-profile allowance: how much the discrete TV of a smooth profile sampled at cell centres
   * can rise at the next step when the samples shift (0.5 times the sum over extrema of the two
   * neighbouring differences; see docs/metrics.md).
   */
  samplingAllowance: number[];
  /** Strict local extrema (noise floor applied, plateaus counted once). */
  extrema: number[];
  /** max(0, extrema[n] - extrema[n-1]). */
  newExtrema: number[];
  min: number[];
  max: number[];
  /** Flat cell index of the minimum / maximum. */
  argMin: number[];
  argMax: number[];
  /** Cell-centre coordinates of the minimum / maximum, one per axis (slowest first), per step. */
  argMinCoordinates: number[][];
  argMaxCoordinates: number[][];
  /** max(0, max - upper bound) and max(0, lower bound - min), bounds as in `bounds`. */
  overshoot: number[];
  undershoot: number[];
  /** Cells more than valueFloor outside `bounds`. */
  violatingCells: number[];
  /** Data magnitude M: largest |phi| up to and including this step. */
  magnitude: number[];
  /** Unit roundoff of this step's storage. */
  unitRoundoff: number[];
  /** Smallest resolvable difference of values, 2 (u / (1 - u) + 4 u64) M. */
  valueFloor: number[];
  /** sum(phi * cell size). */
  mass: number[];
  /** (mass[n] - mass[0]) / massScale. */
  massDrift: number[];
  /** Rounding-error bound of mass[n]. */
  massNoise: number[];
  /** NaN and infinite values in this step (replaced by the previous step's value for the metrics). */
  nonFinite: number[];
}

export interface CellRange {
  axis: string;
  first: number;
  /** Inclusive; smaller than `first` when the range wraps round a periodic axis. */
  last: number;
  firstCoordinate: number;
  lastCoordinate: number;
}

export interface FrontSummary {
  axis: string;
  /** The steepest difference lies between `cell` and the next cell along the axis. */
  cell: number;
  coordinate: number;
  relation: FrontRelation;
}

/** Where the local variation grew most at one step (see localise.ts). */
export interface GrowthLocation {
  /** Position in the series (0-based). */
  position: number;
  step: number;
  /** One range per axis, slowest first. */
  ranges: CellRange[];
  /** Sum of the local-variation increase inside the window. */
  growth: number;
  /** Present when the variable has a velocity sign. */
  front?: FrontSummary;
}

export interface NonFiniteSummary {
  firstStep: number;
  firstPosition: number;
  firstTime: number | null;
  /** Flat index and per-axis indices of the first non-finite cell of the first such step. */
  firstCell: number;
  firstCellIndex: number[];
  /** Cell-centre coordinates of that cell, one per axis. */
  firstCellCoordinates: number[];
  /** Non-finite values over all steps. */
  count: number;
  steps: number;
}

export interface SummaryMetrics {
  steps: number;
  tvFirst: number;
  tvLast: number;
  /** Largest single-step TV increase (0 when TV never grew). */
  maxTvGrowth: number;
  maxTvGrowthRelative: number;
  /** Step index where it happened, null when TV never grew. */
  maxTvGrowthStep: number | null;
  /** (tvLast - tvFirst) / tvReference. */
  totalTvChangeRelative: number;
  maxNewExtrema: number;
  maxOvershoot: number;
  maxUndershoot: number;
  maxViolatingCells: number;
  /** Largest |massDrift|. */
  maxMassDrift: number;
  nonFiniteValues: number;
}

export type Severity = 'warn' | 'fail';
export type Verdict = 'pass' | 'warn' | 'fail';

export type FindingKind =
  | 'tv-growth'
  | 'new-extrema'
  | 'overshoot'
  | 'undershoot'
  | 'conservation-drift'
  | 'non-finite'
  | 'baseline-regression';

export interface FindingLocation {
  ranges: CellRange[];
  front?: FrontSummary;
}

/**
 * One rule broken by one variable. A rule broken at several steps gives one finding: at the first
 * step with the finding's severity, with the worst step and the number of steps alongside.
 */
export interface Finding {
  kind: FindingKind;
  severity: Severity;
  variable: string;
  step: number;
  time: number | null;
  location: FindingLocation | null;
  /** How much: TV increase, new extrema, overshoot, relative drift, count, metric value. */
  magnitude: number;
  /** magnitude relative to the rule's reference (TV growth / first TV, ...) when meaningful. */
  relative: number | null;
  /** The threshold the magnitude crossed (after the noise floor was applied). */
  threshold: number;
  /** Steps at which the rule was broken at warn level or worse. */
  steps: number;
  worst: { step: number; time: number | null; magnitude: number };
  /** For baseline regressions: the metric compared and the baseline's value. */
  metric?: string;
  baseline?: number;
  message: string;
}

export type BoundSource = 'physical' | 'first-step';

export interface VariableSummary {
  version: typeof SUMMARY_VERSION;
  variable: string;
  shape: number[];
  axes: AxisSummary[];
  cells: number;
  precision: Precision;
  options: VariableOptions;
  /** Divisor of tvChangeRelative: the first step's TV, or 1 when that is 0. */
  tvReference: number;
  /** Divisor of massDrift: the first step's sum |phi| * cell size, or 1 when that is 0. */
  massScale: number;
  /**
   * Smooth-profile slack of the first step's range: how far the profile's true maximum (minimum)
   * may lie beyond the sampled one, 1/4 of the two differences next to the first step's maximum
   * (minimum) cell, largest over the axes (twice the quadratic-peak estimate; docs/metrics.md).
   * Used only in smooth-profile mode and only for bounds taken from the first step.
   */
  samplingGap: { upper: number; lower: number };
  /** Total cell size (length, area or volume). */
  totalSize: number;
  /**
   * Bounds used for violatingCells, overshoot and undershoot of the series: each side is the
   * physical bound from the options when given, else the first step's min or max.
   */
  bounds: { lower: number; upper: number; lowerSource: BoundSource; upperSource: BoundSource };
  series: StepSeries;
  growth: GrowthLocation[];
  nonFinite: NonFiniteSummary | null;
  metrics: SummaryMetrics;
  /** Judged with the analyser's policy (the default policy unless one was given). */
  verdict: Verdict;
  findings: Finding[];
}
