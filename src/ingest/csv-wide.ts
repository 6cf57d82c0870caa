import type { GridAxis } from '@/src/analysis/types';
import type { WidePlan } from './csv-layout';
import { GrowableArray, notANumber, raggedRow } from './csv-long';
import { axisFromCoordinates } from './grid';
import type { IngestLimits } from './limits';
import { quoteField, scanNumber } from './number-text';
import { ReadError, type SnapshotStep } from './types';

/**
 * The wide layout: one row per cell, the coordinate first, then one column per step. No step
 * is complete before the last row, so the whole table is held in memory; that is why the
 * layout is meant for small 1D files and has its own size limit (maxWideLayoutBytes).
 */
export class WideLayoutAssembler {
  private readonly scratch = new Float64Array(1);
  private readonly coords = new GrowableArray();
  /** Row-major: row k holds the values of every step for that cell. */
  private readonly values = new GrowableArray();
  private readonly digits: Int32Array;
  private readonly lines = new GrowableArray();
  private rows = 0;

  constructor(
    private readonly plan: WidePlan,
    private readonly limits: IngestLimits,
    private readonly decimalComma: boolean,
  ) {
    this.digits = new Int32Array(plan.steps.length);
  }

  push(row: readonly string[], line: number): void {
    const { header, steps } = this.plan;
    if (row.length !== header.length) throw raggedRow(row, line, header);
    if (this.rows >= this.limits.maxCellsPerStep) {
      throw new ReadError(
        `Line ${line}: the file has more than ${this.limits.maxCellsPerStep} rows (cells); the ` +
          `limit is ${this.limits.maxCellsPerStep} cells per step.`,
        `line ${line}`,
        'limit',
      );
    }
    const scratch = this.scratch;
    const coordText = row[0] as string;
    const dc = scanNumber(coordText, this.decimalComma, scratch);
    if (dc < 0) throw notANumber(dc, coordText, line, 0, header);
    const coordinate = scratch[0] as number;
    if (!Number.isFinite(coordinate)) {
      throw new ReadError(
        `Line ${line}, column 1 ("${header[0]}"): coordinate ${quoteField(coordText)} is not ` +
          'finite; coordinates must be finite numbers.',
        `line ${line}, column 1`,
        'value',
      );
    }
    this.coords.push(coordinate);
    this.lines.push(line);
    for (let s = 0; s < steps.length; s++) {
      const column = (steps[s] as { column: number }).column;
      const text = row[column] as string;
      const d = scanNumber(text, this.decimalComma, scratch);
      if (d < 0) throw notANumber(d, text, line, column, header);
      if (d > (this.digits[s] as number)) this.digits[s] = d;
      this.values.push(scratch[0] as number);
    }
    this.rows++;
  }

  /** Sorts the cells by coordinate and cuts the table into steps. */
  finish(headerLine: number): { axis: GridAxis; steps: SnapshotStep[]; maxDigits: number } {
    const n = this.rows;
    const { steps, variable, header } = this.plan;
    if (n === 0) {
      throw new ReadError(
        `The file has a header (line ${headerLine}: ${header.join(',')}) but no data rows; ` +
          'expected one row per cell after it.',
        `line ${headerLine}`,
        'empty',
      );
    }
    const coords = this.coords.data;
    const order = Array.from({ length: n }, (_, k) => k).sort((a, b) => (coords[a] as number) - (coords[b] as number));
    const sorted = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      const k = order[i] as number;
      sorted[i] = coords[k] as number;
      if (i > 0 && sorted[i] === sorted[i - 1]) {
        const first = Math.min(k, order[i - 1] as number);
        const second = Math.max(k, order[i - 1] as number);
        throw new ReadError(
          `Line ${this.lines.data[second]}: coordinate ${header[0]}=${sorted[i]} repeats line ` +
            `${this.lines.data[first]}; the wide layout lists each cell once.`,
          `line ${this.lines.data[second]}`,
          'grid',
        );
      }
    }
    const count = steps.length;
    const out: SnapshotStep[] = steps.map((step, s) => {
      const field = new Float64Array(n);
      for (let i = 0; i < n; i++) {
        field[i] = this.values.data[(order[i] as number) * count + s] as number;
      }
      const d = this.digits[s] as number;
      return {
        index: step.index,
        time: step.time,
        fields: { [variable]: field },
        significantDigits: d > 0 ? { [variable]: d } : {},
      };
    });
    return {
      axis: axisFromCoordinates(this.plan.coordinateName, sorted, false),
      steps: out,
      maxDigits: this.digits.reduce((m, d) => Math.max(m, d), 0),
    };
  }
}
