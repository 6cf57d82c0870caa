import type { Grid } from '@/src/analysis/types';
import { LongLayoutAssembler } from './csv-long';
import { planCsvLayout, type LongPlan, type WidePlan } from './csv-layout';
import {
  chooseDelimiter,
  csvRowBatches,
  findHeaderLine,
  isBlankRow,
  isCommentRow,
  openTextStream,
  readTextHead,
  splitHeaderLine,
  type RowBatch,
} from './csv-source';
import { WideLayoutAssembler } from './csv-wide';
import { formatBytes, type IngestLimits } from './limits';
import { optionsFor, unusedOptionNotes, type IngestManifest } from './manifest';
import {
  ReadError,
  type CsvDelimiter,
  type SnapshotHeader,
  type SnapshotReader,
  type SnapshotStep,
  type SnapshotVariable,
} from './types';

export interface CsvOpenInput {
  filePath: string;
  fileSize: number;
  gzip: boolean;
  manifest?: IngestManifest;
  limits: IngestLimits;
}

/** Opens a CSV (plain or gzip), reads its header and, for the long layout, its first step. */
export async function openCsv(input: CsvOpenInput): Promise<SnapshotReader> {
  const { limits } = input;
  const head = await readTextHead(input.filePath, input.gzip, limits);
  const headerLine = findHeaderLine(head, limits);
  if (headerLine === null) {
    throw new ReadError(
      head.text.trim() === ''
        ? 'The file is empty (no text); expected a CSV header line such as "step,time,x,rho".'
        : 'The file holds only comment lines; expected a CSV header line such as ' + '"step,time,x,rho" after them.',
      'line 1',
      'empty',
    );
  }
  const delimiter = chooseDelimiter(headerLine.text);
  const names = splitHeaderLine(headerLine.text, delimiter);
  const plan = planCsvLayout(names, headerLine.line, input.manifest, limits);
  // A comma cannot be both the separator and the decimal mark; with ";" or tab it may be
  // either a decimal mark or a typo, and the number scanner accepts it as the decimal mark.
  const decimalComma = delimiter !== ',';
  const text = {
    delimiter,
    decimalMark: decimalComma && usesDecimalComma(head.text, delimiter) ? ',' : '.',
  } as const;
  const newline = head.text.includes('\n') ? '\n' : '\r';
  return plan.kind === 'long'
    ? openLong(input, plan, headerLine.line, { decimalComma, text, newline })
    : openWide(input, plan, headerLine.line, { decimalComma, text, newline });
}

interface TextSettings {
  decimalComma: boolean;
  text: { delimiter: CsvDelimiter; decimalMark: '.' | ',' };
  newline: '\n' | '\r';
}

/** A comma between digits in the first lines of a ";"/tab file: the decimal mark is ",". */
function usesDecimalComma(headText: string, delimiter: CsvDelimiter): boolean {
  const sample = headText.split('\n').slice(1, 50);
  return sample.some((line) => line.split(delimiter).some((f) => /^\s*[+-]?\d*,\d/.test(f)));
}

async function openLong(
  input: CsvOpenInput,
  plan: LongPlan,
  headerLine: number,
  settings: TextSettings,
): Promise<SnapshotReader> {
  const { limits } = input;
  const abort = new AbortController();
  const stream = openTextStream(
    input.filePath,
    input.gzip,
    input.gzip ? limits.maxUncompressedBytes : Number.POSITIVE_INFINITY,
    'The uncompressed text of the upload',
  );
  const batches = csvRowBatches(stream, settings.text.delimiter, settings.newline, abort.signal);
  const assembler = new LongLayoutAssembler(plan, limits, settings.decimalComma);
  const iterator = longSteps(batches, assembler, headerLine);
  let first: IteratorResult<SnapshotStep>;
  try {
    first = await iterator.next();
  } catch (error) {
    abort.abort();
    throw error;
  }
  const axes = assembler.gridAxes();
  if (first.done || axes === null) {
    // longSteps ends with a step or throws; reaching here is a defect, not bad input.
    abort.abort();
    throw new Error('CSV long reader ended without a first step');
  }
  const firstStep = first.value;
  const grid: Grid = { axes };
  const variables = plan.variables.map(({ name }) =>
    decimalVariable(name, firstStep.significantDigits?.[name], input.manifest),
  );
  const notes = [
    ...unusedOptionNotes(
      input.manifest,
      plan.variables.map((v) => v.name),
    ),
    ...variables
      .filter((v) => firstStep.significantDigits?.[v.name] === undefined)
      .map(
        (v) =>
          `variable "${v.name}" has no finite value in the first step; its precision is taken ` +
          'as 17 significant digits',
      ),
  ];
  const header: SnapshotHeader = {
    format: 'csv-long',
    layout: 'long',
    grid,
    variables,
    text: settings.text,
    ...(input.gzip ? { compression: 'gzip' as const } : {}),
    ...(notes.length > 0 ? { notes } : {}),
  };
  async function* steps(): AsyncGenerator<SnapshotStep> {
    yield firstStep;
    yield* iterator;
  }
  return {
    header,
    steps: steps(),
    async close() {
      abort.abort();
      await iterator.return(undefined);
    },
  };
}

/** Steps of the long layout, each handed out as soon as the next step number shows up. */
async function* longSteps(
  batches: AsyncGenerator<RowBatch>,
  assembler: LongLayoutAssembler,
  headerLine: number,
): AsyncGenerator<SnapshotStep> {
  const ready: SnapshotStep[] = [];
  let lastLine = headerLine;
  try {
    for await (const { rows, firstLine } of batches) {
      let failure: unknown = null;
      try {
        for (let i = 0; i < rows.length; i++) {
          const line = firstLine + i;
          if (line <= headerLine) continue;
          const row = rows[i] as string[];
          if (isBlankRow(row) || isCommentRow(row)) continue;
          assembler.push(row, line, ready);
          lastLine = line;
        }
      } catch (error) {
        failure = error;
      }
      // Steps completed before a bad row are still good; hand them out first.
      while (ready.length > 0) yield ready.shift() as SnapshotStep;
      if (failure !== null) throw failure;
    }
    const last = assembler.end(lastLine, headerLine);
    if (last) yield last;
  } finally {
    await batches.return(undefined);
  }
}

async function openWide(
  input: CsvOpenInput,
  plan: WidePlan,
  headerLine: number,
  settings: TextSettings,
): Promise<SnapshotReader> {
  const { limits } = input;
  const what = 'A wide-layout CSV';
  if (!input.gzip && input.fileSize > limits.maxWideLayoutBytes) {
    throw wideTooLarge(input.fileSize, limits);
  }
  const stream = openTextStream(
    input.filePath,
    input.gzip,
    Math.min(limits.maxWideLayoutBytes, limits.maxUncompressedBytes),
    `${what} (read whole; write the long layout "step,time,x,..." for larger files)`,
  );
  const batches = csvRowBatches(stream, settings.text.delimiter, settings.newline);
  const assembler = new WideLayoutAssembler(plan, limits, settings.decimalComma);
  try {
    for await (const { rows, firstLine } of batches) {
      for (let i = 0; i < rows.length; i++) {
        const line = firstLine + i;
        if (line <= headerLine) continue;
        const row = rows[i] as string[];
        if (isBlankRow(row) || isCommentRow(row)) continue;
        assembler.push(row, line);
      }
    }
  } finally {
    await batches.return(undefined);
  }
  const { axis, steps, maxDigits } = assembler.finish(headerLine);
  const variable = decimalVariable(plan.variable, maxDigits || undefined, input.manifest);
  const notes = unusedOptionNotes(input.manifest, [plan.variable]);
  const header: SnapshotHeader = {
    format: 'csv-wide',
    layout: 'wide',
    grid: { axes: [axis] },
    variables: [variable],
    stepCount: steps.length,
    text: settings.text,
    ...(input.gzip ? { compression: 'gzip' as const } : {}),
    ...(notes.length > 0 ? { notes } : {}),
  };
  return {
    header,
    steps: listSteps(steps),
    async close() {
      steps.length = 0;
    },
  };
}

function wideTooLarge(size: number, limits: IngestLimits): ReadError {
  return new ReadError(
    `A wide-layout CSV is read whole, and this one is ${formatBytes(size)}, over the limit of ` +
      `${formatBytes(limits.maxWideLayoutBytes)} for that layout. Write the long layout ` +
      '("step,time,x,<variables>", read step by step) for larger files.',
    'file',
    'limit',
  );
}

/** Hands out the steps and drops each one, so the table is freed as the analysis proceeds. */
async function* listSteps(steps: SnapshotStep[]): AsyncGenerator<SnapshotStep> {
  while (steps.length > 0) yield steps.shift() as SnapshotStep;
}

function decimalVariable(
  name: string,
  digits: number | undefined,
  manifest: IngestManifest | undefined,
): SnapshotVariable {
  const options = optionsFor(manifest, name);
  return {
    name,
    // No finite value to count digits on: assume full double precision, the most cautious
    // choice for the noise floor.
    precision: { kind: 'decimal', significantDigits: digits ?? 17 },
    ...(options ? { options } : {}),
  };
}
