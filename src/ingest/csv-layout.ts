import type { IngestLimits } from './limits';
import { resolveColumnNames, type IngestManifest } from './manifest';
import { NON_FINITE_TEXT, scanNumber } from './number-text';
import { ReadError } from './types';

/**
 * Reading a CSV header: which layout the file uses and what each column means. Pure: the
 * header's names and the manifest in, a plan for the row reader out (or a ReadError that says
 * what the header lacks).
 */

export interface LongPlan {
  kind: 'long';
  header: string[];
  stepColumn: number;
  timeColumn: number | null;
  /** Coordinate columns, slowest axis first (`[z, y, x]`, `[y, x]` or `[x]`). */
  axisColumns: number[];
  variables: { name: string; column: number }[];
}

export interface WideStepColumn {
  column: number;
  index: number;
  time: number;
}

export interface WidePlan {
  kind: 'wide';
  header: string[];
  coordinateName: string;
  variable: string;
  steps: WideStepColumn[];
}

export type CsvPlan = LongPlan | WidePlan;

const STEP_HEADER = /^step\s*=\s*([+-]?\d+)$/i;

export function planCsvLayout(
  header: readonly string[],
  headerLine: number,
  manifest: IngestManifest | undefined,
  limits: IngestLimits,
): CsvPlan {
  const where = `line ${headerLine}`;
  checkHeaderNames(header, headerLine);
  if (header.length < 2) {
    throw new ReadError(
      `Line ${headerLine} (the header) has a single column ${JSON.stringify(header[0] ?? '')}; ` +
        'expected the long layout "step,time,x,<variables>" or the wide layout ' +
        '"x,<one column per step>" separated by "," (or ";" or tab).',
      where,
      'layout',
    );
  }
  const names = resolveColumnNames(manifest);
  const hasStep = indexOfName(header, names.step) >= 0;
  const layout = manifest?.layout;
  if (layout === 'dataset-per-variable' || layout === 'group-per-step') {
    throw new ReadError(`The manifest says layout "${layout}", an HDF5 layout, but the file is CSV.`, where, 'layout');
  }
  if (layout === 'long' || (layout === undefined && hasStep)) {
    return planLong(header, headerLine, manifest, limits);
  }
  if (layout === 'wide' || looksWide(header)) {
    return planWide(header, headerLine, manifest, limits);
  }
  throw new ReadError(
    `Line ${headerLine}: cannot tell the layout from the header (${listNames(header)}). The long ` +
      `layout needs a "${names.step}" column, a "${names.time}" column and coordinate columns ` +
      `("${names.x}"[, "${names.y}"[, "${names.z}"]]); the wide layout needs a coordinate column ` +
      'followed by one column per step headed by its time or "step=<n>". Other column names ' +
      'can be given in the manifest (columns.step, columns.time, columns.x ...).',
    where,
    'layout',
  );
}

function checkHeaderNames(header: readonly string[], headerLine: number): void {
  const seen = new Map<string, number>();
  header.forEach((name, i) => {
    if (name === '') {
      throw new ReadError(
        `Line ${headerLine} (the header): column ${i + 1} has no name; every column needs one.`,
        `line ${headerLine}, column ${i + 1}`,
        'layout',
      );
    }
    const key = name.toLowerCase();
    const before = seen.get(key);
    if (before !== undefined) {
      throw new ReadError(
        `Line ${headerLine} (the header): column ${i + 1} repeats the name ` +
          `${JSON.stringify(name)} of column ${before + 1}; column names must be unique.`,
        `line ${headerLine}, column ${i + 1}`,
        'layout',
      );
    }
    seen.set(key, i);
  });
}

function indexOfName(header: readonly string[], name: string): number {
  const wanted = name.toLowerCase();
  return header.findIndex((h) => h.toLowerCase() === wanted);
}

function listNames(header: readonly string[]): string {
  const shown = header.slice(0, 12).map((h) => JSON.stringify(h));
  return shown.join(', ') + (header.length > 12 ? `, ... (${header.length} columns)` : '');
}

function planLong(
  header: readonly string[],
  headerLine: number,
  manifest: IngestManifest | undefined,
  limits: IngestLimits,
): LongPlan {
  const where = `line ${headerLine}`;
  const names = resolveColumnNames(manifest);
  const stepColumn = indexOfName(header, names.step);
  if (stepColumn < 0) {
    throw new ReadError(
      `Line ${headerLine} (the header): the long layout needs a step column "${names.step}"; ` +
        `found ${listNames(header)}. Name it in the manifest (columns.step) if it is called ` +
        'differently.',
      where,
      'layout',
    );
  }
  const timeIndex = indexOfName(header, names.time);
  const x = indexOfName(header, names.x);
  const y = indexOfName(header, names.y);
  const z = indexOfName(header, names.z);
  if (x < 0) {
    throw new ReadError(
      `Line ${headerLine} (the header): the long layout needs a coordinate column ` +
        `"${names.x}" (then "${names.y}" and "${names.z}" for 2D and 3D); found ` +
        `${listNames(header)}. Name it in the manifest (columns.x) if it is called differently.`,
      where,
      'layout',
    );
  }
  if (z >= 0 && y < 0) {
    throw new ReadError(
      `Line ${headerLine} (the header): there is a "${names.z}" column but no "${names.y}" ` +
        `column; a 3D grid needs "${names.x}", "${names.y}" and "${names.z}".`,
      where,
      'layout',
    );
  }
  const axisColumns = z >= 0 ? [z, y, x] : y >= 0 ? [y, x] : [x];
  const reserved = new Set([stepColumn, timeIndex, ...axisColumns]);

  let variables: { name: string; column: number }[];
  if (manifest?.variables) {
    variables = manifest.variables.map((name) => {
      const column = indexOfName(header, name);
      if (column < 0 || reserved.has(column)) {
        throw new ReadError(
          `The manifest names variable ${JSON.stringify(name)}, which is not a variable ` +
            `column of the header on line ${headerLine} (${listNames(header)}).`,
          where,
          'layout',
        );
      }
      return { name: header[column] as string, column };
    });
  } else {
    variables = header.map((name, column) => ({ name, column })).filter(({ column }) => !reserved.has(column));
  }
  if (variables.length === 0) {
    throw new ReadError(
      `Line ${headerLine} (the header) has step, time and coordinate columns but no variable ` +
        'column; expected at least one, e.g. "step,time,x,rho".',
      where,
      'layout',
    );
  }
  checkVariableCount(variables.length, limits, where);
  return {
    kind: 'long',
    header: [...header],
    stepColumn,
    timeColumn: timeIndex >= 0 ? timeIndex : null,
    axisColumns,
    variables,
  };
}

/** Wide when every column after the first is headed by a number or `step=<n>`. */
function looksWide(header: readonly string[]): boolean {
  const scratch = new Float64Array(1);
  return header.slice(1).every((h) => STEP_HEADER.test(h) || scanNumber(h, false, scratch) >= 1);
}

function planWide(
  header: readonly string[],
  headerLine: number,
  manifest: IngestManifest | undefined,
  limits: IngestLimits,
): WidePlan {
  const scratch = new Float64Array(1);
  const steps: WideStepColumn[] = [];
  let kind: 'time' | 'step' | null = null;
  for (let column = 1; column < header.length; column++) {
    const text = header[column] as string;
    const where = `line ${headerLine}, column ${column + 1}`;
    const stepMatch = STEP_HEADER.exec(text);
    const digits = stepMatch ? -1 : scanNumber(text, false, scratch);
    const thisKind = stepMatch ? 'step' : digits >= 1 ? 'time' : null;
    if (thisKind === null || (digits === NON_FINITE_TEXT && !stepMatch)) {
      throw new ReadError(
        `Line ${headerLine}, column ${column + 1}: the wide layout heads each step column with ` +
          `its time (a finite number) or "step=<n>"; found ${JSON.stringify(text)}.`,
        where,
        'layout',
      );
    }
    if (kind !== null && thisKind !== kind) {
      throw new ReadError(
        `Line ${headerLine}, column ${column + 1}: ${JSON.stringify(text)} mixes "step=<n>" and ` +
          'time headings; use one kind for every step column.',
        where,
        'layout',
      );
    }
    kind = thisKind;
    const index = stepMatch ? Number(stepMatch[1]) : column - 1;
    const time = stepMatch ? Number.NaN : (scratch[0] as number);
    const previous = steps[steps.length - 1];
    if (previous && (stepMatch ? index <= previous.index : !(time > previous.time))) {
      throw new ReadError(
        `Line ${headerLine}, column ${column + 1}: step column ${JSON.stringify(text)} does not ` +
          `come after ${JSON.stringify(header[previous.column])}; step columns must be in ` +
          'strictly increasing order of step (or time).',
        where,
        'steps',
      );
    }
    if (stepMatch && !Number.isSafeInteger(index)) {
      throw new ReadError(
        `Line ${headerLine}, column ${column + 1}: step number in ${JSON.stringify(text)} is out ` + 'of range.',
        where,
        'steps',
      );
    }
    steps.push({ column, index, time });
  }
  if (steps.length > limits.maxSteps) {
    throw new ReadError(
      `Line ${headerLine}: the header has ${steps.length} step columns; the limit is ` +
        `${limits.maxSteps} steps per file.`,
      `line ${headerLine}`,
      'limit',
    );
  }
  return {
    kind: 'wide',
    header: [...header],
    coordinateName: header[0] as string,
    variable: manifest?.variables?.[0] ?? 'value',
    steps,
  };
}

export function checkVariableCount(count: number, limits: IngestLimits, where: string): void {
  if (count > limits.maxVariables) {
    throw new ReadError(
      `The file has ${count} variables; the limit is ${limits.maxVariables} per file. Name the ` +
        'ones to check in the manifest (variables).',
      where,
      'limit',
    );
  }
}
