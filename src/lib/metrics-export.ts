/**
 * The per-step metrics of a run as a download: CSV (one row per variable and step, one column per
 * metric) for spreadsheets and scripts. Numbers are written in JavaScript's shortest round-trip
 * form, so reading them back gives the stored float64 values exactly.
 */

export const METRIC_COLUMNS = [
  'tv',
  'tvChange',
  'tvChangeRelative',
  'tvNoise',
  'extrema',
  'newExtrema',
  'min',
  'max',
  'overshoot',
  'undershoot',
  'violatingCells',
  'mass',
  'massDrift',
  'massNoise',
  'nonFinite',
] as const;

export type MetricColumn = (typeof METRIC_COLUMNS)[number];

export type MetricSeries = { index: readonly number[]; time: readonly (number | null)[] } & Partial<
  Record<MetricColumn, readonly (number | null)[]>
>;

/** A number cell: empty for missing values, shortest round-trip text otherwise. */
export function csvNumber(x: number | null | undefined): string {
  return x === null || x === undefined || !Number.isFinite(x) ? '' : String(x);
}

/** Quotes a text cell when it holds a separator, a quote or a line break (RFC 4180). */
export function csvText(s: string): string {
  return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

/** CSV with a header row `variable,step,time,<metrics>`; rows end with CRLF as RFC 4180 asks. */
export function metricsCsv(variables: readonly { name: string; series: MetricSeries }[]): string {
  const lines = [['variable', 'step', 'time', ...METRIC_COLUMNS].join(',')];
  for (const { name, series } of variables) {
    for (let p = 0; p < series.index.length; p++) {
      const cells = [csvText(name), csvNumber(series.index[p]), csvNumber(series.time[p])];
      for (const column of METRIC_COLUMNS) cells.push(csvNumber(series[column]?.[p]));
      lines.push(cells.join(','));
    }
  }
  return `${lines.join('\r\n')}\r\n`;
}

/** The series restricted to the exported columns, for the JSON download. */
export function metricsJson(series: MetricSeries): Record<string, readonly (number | null)[]> {
  const out: Record<string, readonly (number | null)[]> = { step: series.index, time: series.time };
  for (const column of METRIC_COLUMNS) {
    const values = series[column];
    if (values) out[column] = values;
  }
  return out;
}
