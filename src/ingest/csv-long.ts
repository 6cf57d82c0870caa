import type { GridAxis } from '@/src/analysis/types';
import type { LongPlan } from './csv-layout';
import { axisFromCoordinates, describeCell, distinctSorted, findCoordinate } from './grid';
import type { IngestLimits } from './limits';
import { EMPTY_TEXT, quoteField, scanNumber } from './number-text';
import { ReadError, type SnapshotStep } from './types';

/**
 * Turns rows of the long layout (`step,time,x[,y[,z]],<var>...`, one row per cell and step)
 * into complete steps. Rows of a step may come in any cell order; the first step fixes the set
 * of cells (and so the grid), every later step must list exactly those cells. Steps come in
 * blocks with strictly increasing step numbers, so a step is complete the moment the step
 * number changes.
 *
 * Memory: the first step is buffered row by row until its grid is known; after that each row
 * is written straight into the step's preallocated arrays. Nothing older than the current step
 * is kept besides the grid and the row-to-cell map of the first step.
 */
export class LongLayoutAssembler {
  private readonly dims: number;
  private readonly varCount: number;
  private readonly scratch = new Float64Array(1);
  private readonly axisNames: string[];

  // current step
  private stepNumber: number | null = null;
  private stepTime = Number.NaN;
  private stepFirstLine = 0;
  private rowsInStep = 0;
  private readonly digits: Int32Array;
  /** Steps finished so far. */
  private ordinal = 0;
  /** Row's coordinates and values, reused per row to avoid allocating. */
  private readonly rowCoords: Float64Array;
  private readonly rowValues: Float64Array;

  // first step, before the grid is known
  private firstCoords: GrowableArray[] = [];
  private firstValues: GrowableArray[] = [];

  // after the first step
  private axes: Float64Array[] | null = null;
  private cellCount = 0;
  private strides: number[] = [];
  /** Coordinates of the first step's rows in file order, and the cell each row filled. */
  private firstRowCoords: Float64Array[] = [];
  private rowToCell: Int32Array = new Int32Array(0);
  /** Step ordinal that last filled each cell; finds a cell listed twice without clearing. */
  private stamp: Int32Array = new Int32Array(0);
  private values: Float64Array[] = [];

  constructor(
    private readonly plan: LongPlan,
    private readonly limits: IngestLimits,
    private readonly decimalComma: boolean,
  ) {
    this.dims = plan.axisColumns.length;
    this.varCount = plan.variables.length;
    this.axisNames = plan.axisColumns.map((c) => plan.header[c] as string);
    this.digits = new Int32Array(this.varCount);
    this.rowCoords = new Float64Array(this.dims);
    this.rowValues = new Float64Array(this.varCount);
    for (let a = 0; a < this.dims; a++) this.firstCoords.push(new GrowableArray());
    for (let v = 0; v < this.varCount; v++) this.firstValues.push(new GrowableArray());
  }

  /** Grid axes, known once the first step is complete. */
  gridAxes(): GridAxis[] | null {
    const axes = this.axes;
    if (!axes) return null;
    return axes.map((coords, a) => axisFromCoordinates(this.axisNames[a] as string, coords, false));
  }

  /** Rows read so far, all steps together; zero means a header-only file. */
  get stepsFinished(): number {
    return this.ordinal;
  }

  /**
   * Reads one data row (already known to be neither blank nor a comment). A step completed by
   * this row's new step number is appended to `out` before the row itself is checked, so a
   * caller can hand out every good step before reporting an error in the next one.
   */
  push(row: readonly string[], line: number, out: SnapshotStep[]): void {
    const plan = this.plan;
    if (row.length !== plan.header.length) throw raggedRow(row, line, plan.header);

    const step = this.readStep(row, line);
    if (this.stepNumber === null) {
      this.startStep(step, line);
    } else if (step !== this.stepNumber) {
      // The current step is complete whatever the new number is; hand it out before judging
      // the number.
      const previous = this.stepNumber;
      out.push(this.finishStep(line - 1));
      if (step < previous) {
        throw new ReadError(
          `Line ${line}: step ${step} comes after step ${previous}; step numbers must ` +
            'strictly increase, with all rows of a step in one block (a step number may appear ' +
            'in one block only).',
          `line ${line}, column ${plan.stepColumn + 1} ("${plan.header[plan.stepColumn]}")`,
          'steps',
        );
      }
      this.startStep(step, line);
    }
    this.readTime(row, line);

    const coords = this.rowCoords;
    for (let a = 0; a < this.dims; a++) {
      coords[a] = this.readCoordinate(row, plan.axisColumns[a] as number, line);
    }
    const values = this.rowValues;
    const digits = this.digits;
    const scratch = this.scratch;
    const comma = this.decimalComma;
    for (let v = 0; v < this.varCount; v++) {
      const column = (plan.variables[v] as { column: number }).column;
      const text = row[column] as string;
      const d = scanNumber(text, comma, scratch);
      if (d < 0) throw notANumber(d, text, line, column, plan.header);
      if (d > (digits[v] as number)) digits[v] = d;
      values[v] = scratch[0] as number;
    }

    if (this.axes === null) this.bufferFirstStepRow(line);
    else this.writeRow(row, line);
    this.rowsInStep++;
  }

  /** Call at the end of the input; returns the last step, if any. */
  end(lastLine: number, headerLine: number): SnapshotStep | null {
    if (this.stepNumber === null) {
      throw new ReadError(
        `The file has a header (line ${headerLine}: ${this.plan.header.join(',')}) but no data ` +
          'rows; expected one row per cell and step after it.',
        `line ${headerLine}`,
        'empty',
      );
    }
    const step = this.finishStep(lastLine);
    this.stepNumber = null;
    return step;
  }

  private readStep(row: readonly string[], line: number): number {
    const column = this.plan.stepColumn;
    const text = row[column] as string;
    const d = scanNumber(text, this.decimalComma, this.scratch);
    if (d < 0) throw notANumber(d, text, line, column, this.plan.header);
    const step = this.scratch[0] as number;
    if (!Number.isSafeInteger(step)) {
      throw new ReadError(
        `Line ${line}, column ${column + 1} ("${this.plan.header[column]}"): step number ` +
          `${quoteField(text)} is not an integer; expected a whole number such as 0, 10, 200.`,
        `line ${line}, column ${column + 1}`,
        'value',
      );
    }
    return step;
  }

  private readTime(row: readonly string[], line: number): void {
    const column = this.plan.timeColumn;
    if (column === null) return;
    const text = row[column] as string;
    const d = scanNumber(text, this.decimalComma, this.scratch);
    if (d < 0) throw notANumber(d, text, line, column, this.plan.header);
    const time = this.scratch[0] as number;
    if (this.rowsInStep === 0) {
      this.stepTime = time;
    } else if (time !== this.stepTime && !(Number.isNaN(time) && Number.isNaN(this.stepTime))) {
      throw new ReadError(
        `Line ${line}, column ${column + 1} ("${this.plan.header[column]}"): time ` +
          `${quoteField(text)} differs from ${this.stepTime} given on line ${this.stepFirstLine} ` +
          `for the same step ${this.stepNumber}; all rows of a step must carry the same time.`,
        `line ${line}, column ${column + 1}`,
        'steps',
      );
    }
  }

  private readCoordinate(row: readonly string[], column: number, line: number): number {
    const text = row[column] as string;
    const d = scanNumber(text, this.decimalComma, this.scratch);
    if (d < 0) throw notANumber(d, text, line, column, this.plan.header);
    const value = this.scratch[0] as number;
    if (!Number.isFinite(value)) {
      throw new ReadError(
        `Line ${line}, column ${column + 1} ("${this.plan.header[column]}"): coordinate ` +
          `${quoteField(text)} is not finite; coordinates must be finite numbers.`,
        `line ${line}, column ${column + 1}`,
        'value',
      );
    }
    return value;
  }

  private startStep(step: number, line: number): void {
    if (this.ordinal + 1 > this.limits.maxSteps) {
      throw new ReadError(
        `Line ${line}: step ${step} is step number ${this.ordinal + 1} of the file; the limit is ` +
          `${this.limits.maxSteps} steps per file.`,
        `line ${line}`,
        'limit',
      );
    }
    this.stepNumber = step;
    this.stepFirstLine = line;
    this.stepTime = Number.NaN;
    this.rowsInStep = 0;
    this.digits.fill(0);
    if (this.axes !== null) {
      this.values = [];
      for (let v = 0; v < this.varCount; v++) this.values.push(new Float64Array(this.cellCount));
    }
  }

  private bufferFirstStepRow(line: number): void {
    if (this.rowsInStep >= this.limits.maxCellsPerStep) {
      throw new ReadError(
        `Line ${line}: the first step has more than ${this.limits.maxCellsPerStep} rows (cells); ` +
          `the limit is ${this.limits.maxCellsPerStep} cells per step.`,
        `line ${line}`,
        'limit',
      );
    }
    for (let a = 0; a < this.dims; a++) {
      (this.firstCoords[a] as GrowableArray).push(this.rowCoords[a] as number);
    }
    for (let v = 0; v < this.varCount; v++) {
      (this.firstValues[v] as GrowableArray).push(this.rowValues[v] as number);
    }
  }

  /** Scatters a row of a later step into its cell. */
  private writeRow(row: readonly string[], line: number): void {
    const k = this.rowsInStep;
    const coords = this.rowCoords;
    let cell = -1;
    // Solvers write every step in the same order: try the first step's row at this position.
    if (k < this.cellCount) {
      let same = true;
      for (let a = 0; a < this.dims; a++) {
        if ((this.firstRowCoords[a] as Float64Array)[k] !== coords[a]) {
          same = false;
          break;
        }
      }
      if (same) cell = this.rowToCell[k] as number;
    }
    if (cell < 0) cell = this.locate(row, line);
    if (this.stamp[cell] === this.ordinal) throw this.duplicateCell(row, line);
    this.stamp[cell] = this.ordinal;
    for (let v = 0; v < this.varCount; v++) {
      (this.values[v] as Float64Array)[cell] = this.rowValues[v] as number;
    }
  }

  private locate(row: readonly string[], line: number): number {
    const axes = this.axes as Float64Array[];
    let cell = 0;
    for (let a = 0; a < this.dims; a++) {
      const i = findCoordinate(axes[a] as Float64Array, this.rowCoords[a] as number);
      if (i < 0) {
        throw new ReadError(
          `Line ${line}: cell ${this.cellText(row)} of step ${this.stepNumber} is not a cell of ` +
            `the first step; every step must list the same ${this.cellCount} cells.`,
          `line ${line}`,
          'grid',
        );
      }
      cell += i * (this.strides[a] as number);
    }
    return cell;
  }

  private duplicateCell(row: readonly string[], line: number): ReadError {
    return new ReadError(
      `Line ${line}: cell ${this.cellText(row)} appears twice in step ${this.stepNumber}; each ` +
        'step must list each cell once (a repeated step number also causes this).',
      `line ${line}`,
      'grid',
    );
  }

  private cellText(row: readonly string[]): string {
    return describeCell(
      this.axisNames,
      this.plan.axisColumns.map((c) => row[c] as string),
    );
  }

  private finishStep(lastLine: number): SnapshotStep {
    if (this.axes === null) this.fixGrid(lastLine);
    else if (this.rowsInStep !== this.cellCount) {
      throw new ReadError(
        `Step ${this.stepNumber} (lines ${this.stepFirstLine}-${lastLine}) has ` +
          `${this.rowsInStep} rows, but the first step has ${this.cellCount} cells; every step ` +
          'must list each cell of the first step once.',
        `lines ${this.stepFirstLine}-${lastLine}`,
        'grid',
      );
    }
    const fields: Record<string, Float64Array> = {};
    const significantDigits: Record<string, number> = {};
    this.plan.variables.forEach(({ name }, v) => {
      fields[name] = this.values[v] as Float64Array;
      const d = this.digits[v] as number;
      if (d > 0) significantDigits[name] = d;
    });
    this.ordinal++;
    return {
      index: this.stepNumber as number,
      time: this.stepTime,
      fields,
      significantDigits,
    };
  }

  /**
   * Builds the grid from the first step: the distinct coordinates along each axis span the
   * grid, which must have exactly one row per cell. Then scatters the buffered rows into cell
   * order and remembers, per row, where it went.
   */
  private fixGrid(lastLine: number): void {
    const n = this.rowsInStep;
    const axes = this.firstCoords.map((g) => distinctSorted(g.data, n));
    const sizes = axes.map((a) => a.length);
    const cells = sizes.reduce((p, s) => p * s, 1);
    const range = `lines ${this.stepFirstLine}-${lastLine}`;
    if (cells > this.limits.maxCellsPerStep) {
      throw new ReadError(
        `The first step's coordinates span ${sizes.join(' × ')} = ${cells} cells; the limit is ` +
          `${this.limits.maxCellsPerStep} cells per step.`,
        range,
        'limit',
      );
    }
    this.axes = axes;
    this.cellCount = cells;
    this.strides = strides(sizes);
    this.stamp = new Int32Array(cells).fill(-1);
    this.rowToCell = new Int32Array(n);
    this.firstRowCoords = this.firstCoords.map((g) => g.data.slice(0, n));
    this.values = [];
    for (let v = 0; v < this.varCount; v++) this.values.push(new Float64Array(cells));

    const rowCoords = this.rowCoords;
    for (let k = 0; k < n; k++) {
      let cell = 0;
      for (let a = 0; a < this.dims; a++) {
        const value = (this.firstRowCoords[a] as Float64Array)[k] as number;
        rowCoords[a] = value;
        cell += findCoordinate(axes[a] as Float64Array, value) * (this.strides[a] as number);
      }
      if (this.stamp[cell] === this.ordinal) {
        const texts = Array.from(rowCoords.subarray(0, this.dims), (v) => String(v));
        throw new ReadError(
          `Line ${this.stepFirstLine + k}: cell ${describeCell(this.axisNames, texts)} appears ` +
            `twice in the first step (step ${this.stepNumber}); each step must list each cell ` +
            'once (a repeated step number also causes this).',
          `line ${this.stepFirstLine + k}`,
          'grid',
        );
      }
      this.stamp[cell] = this.ordinal;
      this.rowToCell[k] = cell;
      for (let v = 0; v < this.varCount; v++) {
        (this.values[v] as Float64Array)[cell] = (this.firstValues[v] as GrowableArray).data[k] as number;
      }
    }
    // No cell twice, so fewer rows than cells means some combinations are missing.
    if (cells !== n) {
      throw new ReadError(
        `The first step (step ${this.stepNumber}, ${range}) has ${n} rows, but its coordinates ` +
          `take ${sizes.map((s, a) => `${s} ${this.axisNames[a]} values`).join(', ')}, which ` +
          `span ${cells} cells; a structured grid lists every combination of coordinates ` +
          'exactly once.',
        range,
        'grid',
      );
    }
    // The buffers are no longer needed; let them go before the next step allocates.
    this.firstCoords = [];
    this.firstValues = [];
  }
}

/** Row-major strides, slowest axis first: for [nz, ny, nx] → [ny*nx, nx, 1]. */
function strides(sizes: readonly number[]): number[] {
  const out = new Array<number>(sizes.length).fill(1);
  for (let a = sizes.length - 2; a >= 0; a--) {
    out[a] = (out[a + 1] as number) * (sizes[a + 1] as number);
  }
  return out;
}

/** A Float64Array that doubles its capacity as values are appended. */
export class GrowableArray {
  data = new Float64Array(1024);
  length = 0;
  push(value: number): void {
    if (this.length === this.data.length) {
      const bigger = new Float64Array(this.data.length * 2);
      bigger.set(this.data);
      this.data = bigger;
    }
    this.data[this.length++] = value;
  }
}

export function raggedRow(row: readonly string[], line: number, header: readonly string[]): ReadError {
  const found = row.length;
  const expected = header.length;
  const hint =
    found > expected
      ? ' A decimal comma inside a comma-separated file splits a number in two: write "." as ' +
        'the decimal mark, or separate fields with ";".'
      : '';
  return new ReadError(
    `Line ${line} has ${found} fields but the header has ${expected} ` + `(${header.join(', ')}).${hint}`,
    `line ${line}`,
    'syntax',
  );
}

export function notANumber(
  code: number,
  text: string,
  line: number,
  column: number,
  header: readonly string[],
): ReadError {
  const where = `line ${line}, column ${column + 1}`;
  const name = header[column] ?? '';
  if (code === EMPTY_TEXT) {
    return new ReadError(
      `Line ${line}, column ${column + 1} ("${name}") is empty; expected a number (write NaN ` +
        'for a missing value).',
      where,
      'value',
    );
  }
  return new ReadError(
    `Line ${line}, column ${column + 1} ("${name}"): ${quoteField(text.trim())} is not a ` +
      'number; expected a decimal number such as 0.125, -3, 1.5e-3, NaN or Inf.',
    where,
    'value',
  );
}
