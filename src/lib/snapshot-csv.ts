/**
 * Writes snapshots in the long CSV layout (`step,time,x[,y[,z]],<var>...`, docs/formats.md), one
 * row per cell and step, cells in row-major order. Used to make demo data and fixtures from the
 * reference schemes; the readers in src/ingest read it back.
 */

export interface LongCsvAxis {
  /** Column name: `x`, `y` or `z`. */
  name: string;
  /** Cell-centre coordinates along the axis. */
  centres: ArrayLike<number>;
}

export interface LongCsvInput {
  /** Step numbers, one per stored step. */
  steps: readonly number[];
  times: readonly number[];
  /** Slowest axis first, like the grid (`[y, x]` for 2D); columns are written x, y, z. */
  axes: readonly LongCsvAxis[];
  /** Per variable, one row-major array per step. */
  variables: Record<string, readonly ArrayLike<number>[]>;
  /** Significant digits written for variable values (17 round-trips float64 exactly). */
  digits: number;
}

/** Cell-centre coordinates of `n` uniform cells on [0, length]. */
export function cellCentres(n: number, length = 1): Float64Array {
  return Float64Array.from({ length: n }, (_, i) => ((i + 0.5) * length) / n);
}

export function formatLongCsv(input: LongCsvInput): string {
  const names = Object.keys(input.variables);
  const columnAxes = [...input.axes].reverse(); // x first in the header
  const lines: string[] = [['step', 'time', ...columnAxes.map((a) => a.name), ...names].join(',')];
  const sizes = input.axes.map((a) => a.centres.length);
  const cells = sizes.reduce((a, b) => a * b, 1);
  const index = new Array<number>(sizes.length).fill(0);
  input.steps.forEach((step, k) => {
    const prefix = `${step},${input.times[k]}`;
    for (let cell = 0; cell < cells; cell++) {
      unravel(cell, sizes, index);
      const coords: string[] = [];
      for (let a = input.axes.length - 1; a >= 0; a--) coords.push(String(input.axes[a]!.centres[index[a]!]));
      const values = names.map((n) => formatValue(input.variables[n]![k]![cell]!, input.digits));
      lines.push(`${prefix},${coords.join(',')},${values.join(',')}`);
    }
  });
  return `${lines.join('\n')}\n`;
}

function unravel(flat: number, sizes: readonly number[], out: number[]): void {
  let rest = flat;
  for (let a = sizes.length - 1; a >= 0; a--) {
    out[a] = rest % sizes[a]!;
    rest = Math.floor(rest / sizes[a]!);
  }
}

function formatValue(v: number, digits: number): string {
  if (Number.isNaN(v)) return 'NaN';
  if (!Number.isFinite(v)) return v > 0 ? 'Inf' : '-Inf';
  return v.toPrecision(digits);
}
