/**
 * The plain shapes the run page passes around: what its server component hands to the client
 * components, and what the chart routes under /api/v1/runs/:id answer. Types only, so both the
 * server and the browser bundle can import them.
 */

export type RunStatus = 'queued' | 'analysing' | 'done' | 'error';
export type RunVerdict = 'pass' | 'warn' | 'fail' | 'error';
export type CheckLevel = 'fail' | 'warn' | 'off';

export interface CellRangeView {
  axis: string;
  first: number;
  /** Inclusive; smaller than `first` when the range wraps round a periodic axis. */
  last: number;
  firstCoordinate: number;
  lastCoordinate: number;
}

export interface FindingView {
  id: string;
  variable: string;
  kind: string;
  severity: 'warn' | 'fail';
  step: number | null;
  time: number | null;
  location: { ranges: CellRangeView[]; front?: { axis: string; cell: number; relation: string } } | null;
  magnitude: number | null;
  threshold: number | null;
  message: string;
}

/** The rules one variable was judged by, resolved from the run's stored policy. */
export interface VariableRulesView {
  tv: { check: CheckLevel; failRelative: number; warnRelative: number; smoothProfile: boolean; band: string };
  conservation: { check: CheckLevel; failRelative: number; warnRelative: number };
  bounds: {
    check: CheckLevel;
    lower: number;
    upper: number;
    lowerSource: 'physical' | 'first-step';
    upperSource: 'physical' | 'first-step';
    tolerance: number;
    relativeTolerance: number;
  };
  newExtrema: { check: CheckLevel; allow: number };
}

export interface AxisView {
  name: string;
  size: number;
  periodic: boolean;
}

export interface VariableView {
  name: string;
  shape: number[];
  axes: AxisView[];
  /** Axes with more than one cell. */
  dims: number;
  precision: string;
  cells: number;
  tvReference: number;
  /** Step numbers as written by the solver, one per stored step (the slider moves over these). */
  steps: number[];
  times: (number | null)[];
  rules: VariableRulesView;
}

export interface BaselineView {
  runId: string;
  branch: string;
  /** True when the baseline was found on the project's default branch, not the run's branch. */
  fromDefaultBranch: boolean;
  buildKey: string;
  commit: string;
  acceptedAt: string;
  /** This run is itself the accepted baseline (nothing to overlay). */
  isThisRun: boolean;
  variables: string[];
}

export interface RunPageData {
  workspace: string;
  run: {
    id: string;
    status: RunStatus;
    verdict: RunVerdict | null;
    errorMessage: string | null;
    queuedAt: string;
    startedAt: string | null;
    finishedAt: string | null;
  };
  project: { slug: string; name: string };
  caseName: string;
  build: { key: string; commit: string; branch: string; ciUrl: string | null };
  findings: FindingView[];
  variables: VariableView[];
  baseline: BaselineView | null;
  note: string;
}

/** Columns of GET /api/v1/runs/:id/chart, each aligned with `positions`. */
export const CHART_COLUMNS = [
  'tv',
  'tvChange',
  /** TV rise per step that fails / warns (null at the first step). */
  'tvFail',
  'tvWarn',
  /** The noise floor of the TV change, tvNoise[n-1] + tvNoise[n]. */
  'tvFloor',
  /** TV[n-1] + tvFail[n]: the top of the tolerance band on the TV chart. */
  'tvCeiling',
  'tvPrevious',
  'extrema',
  'newExtrema',
  'min',
  'max',
  'boundTolerance',
  'violatingCells',
  'massDrift',
  'massFail',
  'massWarn',
] as const;
export type ChartColumn = (typeof CHART_COLUMNS)[number];

export interface ChartSeriesView {
  variable: string;
  variables: string[];
  /** Number of stored steps of the variable (before decimation). */
  count: number;
  /** True when every step is present. */
  complete: boolean;
  /** Kept positions (0-based, increasing) and their step numbers and times. */
  positions: number[];
  step: number[];
  time: (number | null)[];
  columns: Record<ChartColumn, (number | null)[]>;
  /** The bounds judged by (physical when declared, else the first step's range). */
  bounds: { lower: number; upper: number };
}

/** GET /api/v1/runs/:id/steps/:step: one step reduced for a chart. */
export interface StepView {
  variable: string;
  step: number;
  time: number | null;
  shape: number[];
  /** 1D: kept cell indices and their values. 2D/3D: a block-averaged grid of `rows` x `cols`. */
  index?: number[];
  values: (number | null)[];
  rows?: number;
  cols?: number;
  complete: boolean;
  /** 3D: which plane of the slowest axis was cut. */
  slice?: { axis: string; index: number; count: number };
  /** 1D with `from`/`to`: the cell window that was decimated. */
  window?: { from: number; to: number };
  /** 1D: extrema without a same-kind extremum nearby at the previous step (when the step gained extrema). */
  newExtrema?: number[];
}

/** GET /api/v1/runs/:id/growth: where local variation grew between a step and the previous one. */
export interface GrowthView {
  variable: string;
  step: number;
  previousStep: number;
  shape: number[];
  rows: number;
  cols: number;
  /** Block means of the per-cell growth of local variation (row-major, rows x cols). */
  values: (number | null)[];
  /** Sum over the plane: the TV change it accounts for. */
  total: number;
  /** Largest |growth| of a single cell (before block averaging). */
  peak: number;
  complete: boolean;
  slice?: { axis: string; index: number; count: number };
}
