import { open } from 'node:fs/promises';
import path from 'node:path';
import type { Dataset, File as H5File, Group, Metadata } from 'h5wasm/node';
import type { FieldArray, Grid, GridAxis, Precision } from '@/src/analysis/types';
import { axisFromCoordinates, firstNonIncreasing } from './grid';
import { readSuperblockSummary } from './hdf5-superblock';
import { formatBytes, type IngestLimits } from './limits';
import { optionsFor, resolveColumnNames, unusedOptionNotes, type ColumnNames, type IngestManifest } from './manifest';
import { ReadError, type SnapshotHeader, type SnapshotReader, type SnapshotStep } from './types';

/**
 * HDF5 (and NetCDF-4, which is HDF5 underneath) through h5wasm. Two layouts:
 *
 * - dataset per variable: `/rho` shaped [steps, nx], [steps, ny, nx] or [steps, nz, ny, nx],
 *   with optional `/time` [steps], `/step` [steps] and coordinate datasets `/x`, `/y`, `/z`
 *   (or the dimension scales attached to the variable, as NetCDF-4 writes them);
 * - group per step: `/step_000010/rho` shaped [nx], [ny, nx] or [nz, ny, nx], the time in the
 *   group's `time` attribute.
 *
 * One step is read at a time (a hyperslab of each variable), so memory stays at one step
 * whatever the file size. Optional attributes on the variable or the root: `periodic`
 * (0/1 for every axis, one flag per axis, or axis names such as "x,y") and `dx`/`dy`/`dz`
 * (uniform cell widths, used when there are no coordinate datasets).
 */

type H5wasm = typeof import('h5wasm/node').default;

let loading: Promise<H5wasm> | null = null;

/**
 * Loads the wasm module once. HDF5's error stack is switched to throw: with the default
 * handler a failed read prints a trace and hands back uninitialised memory as if it were data.
 */
function loadH5wasm(): Promise<H5wasm> {
  loading ??= (async () => {
    const h5wasm = await importH5wasm();
    const wasm = await h5wasm.ready;
    wasm.activate_throwing_error_handler();
    return h5wasm;
  })();
  return loading;
}

/**
 * Under tsx (how the worker runs), every imported module passes through tsx's loader, which
 * spends about 2 s and keeps about 600 MB of memory processing h5wasm's 4 MB emscripten file.
 * A `tsx-namespace` query that tsx does not own makes it hand the file to Node untouched;
 * plain Node treats the query as part of the module's URL and nothing else. If the URL form
 * is refused (other loaders), the ordinary import is used.
 */
async function importH5wasm(): Promise<H5wasm> {
  try {
    const url = `${import.meta.resolve('h5wasm/node')}?tsx-namespace=varigate-h5wasm`;
    const mod = (await import(/* @vite-ignore */ url)) as typeof import('h5wasm/node');
    if (typeof mod.default?.File === 'function') return mod.default;
  } catch {
    // fall through to the ordinary import
  }
  return (await import('h5wasm/node')).default;
}

const FLOAT_CLASS = 1;
const INTEGER_CLASS = 0;
const STRING_CLASS = 3;
const COMPOUND_CLASS = 6;
const STEP_GROUP = /^step[_-]?(\d+)$/i;
const NETCDF_PHONY_DIMENSION = 'This is a netCDF dimension but not a netCDF variable';

export interface Hdf5OpenInput {
  filePath: string;
  fileSize: number;
  /** Where the HDF5 signature was found (0, or 512·2^k with a user block). */
  signatureOffset: number;
  manifest?: IngestManifest;
  limits: IngestLimits;
}

interface VariablePlan {
  name: string;
  /** Dataset path (dataset per variable) or name inside each step group. */
  path: string;
  precision: Precision;
}

interface StepPlan {
  index: number;
  time: number;
  /** Group path for the group-per-step layout. */
  group?: string;
}

interface FilePlan {
  layout: 'dataset-per-variable' | 'group-per-step';
  variables: VariablePlan[];
  spatialShape: number[];
  steps: StepPlan[];
  grid: Grid;
  notes: string[];
}

export async function openHdf5(input: Hdf5OpenInput): Promise<SnapshotReader> {
  await checkNotTruncated(input);
  const h5wasm = await loadH5wasm();
  const file = openFile(h5wasm, input.filePath);
  let plan: FilePlan;
  try {
    plan = planFile(h5wasm, file, input.manifest, input.limits);
  } catch (error) {
    safeClose(file);
    throw asReadError(error, 'file', 'read the file structure');
  }

  let closed = false;
  const header: SnapshotHeader = {
    format: 'hdf5',
    layout: plan.layout,
    grid: plan.grid,
    variables: plan.variables.map((v) => {
      const options = optionsFor(input.manifest, v.name);
      return { name: v.name, precision: v.precision, ...(options ? { options } : {}) };
    }),
    stepCount: plan.steps.length,
    ...(plan.notes.length > 0 ? { notes: plan.notes } : {}),
  };

  async function* steps(): AsyncGenerator<SnapshotStep> {
    for (let k = 0; k < plan.steps.length && !closed; k++) {
      yield readStep(h5wasm, file, plan, k);
      // Reads are synchronous wasm calls; let timers and I/O (heartbeats, cancellation) run
      // between steps.
      await new Promise<void>((resolve) => setImmediate(resolve));
    }
  }

  return {
    header,
    steps: steps(),
    async close() {
      if (closed) return;
      closed = true;
      safeClose(file);
    },
  };
}

/** Refuses a file whose superblock records more bytes than the file has. */
async function checkNotTruncated(input: Hdf5OpenInput): Promise<void> {
  const handle = await open(input.filePath, 'r');
  let bytes: Buffer;
  try {
    const buffer = Buffer.alloc(128);
    const { bytesRead } = await handle.read(buffer, 0, 128, input.signatureOffset);
    bytes = buffer.subarray(0, bytesRead);
  } finally {
    await handle.close();
  }
  const summary = readSuperblockSummary(bytes);
  if (summary === null) {
    throw new ReadError(
      `The HDF5 file is cut off inside its superblock (it is ${input.fileSize} bytes long); ` +
        'upload the complete file.',
      `byte ${input.signatureOffset}`,
      'truncated',
    );
  }
  if (summary.expectedSize !== null && summary.expectedSize > input.fileSize) {
    throw new ReadError(
      `The HDF5 file is truncated: it is ${input.fileSize} bytes long but its superblock ` +
        `records ${summary.expectedSize} bytes (${formatBytes(summary.expectedSize)}). The ` +
        'upload or copy was probably interrupted; upload the complete file.',
      `byte ${input.fileSize}`,
      'truncated',
    );
  }
}

function openFile(h5wasm: H5wasm, filePath: string): H5File {
  let file: H5File;
  try {
    file = new h5wasm.File(path.resolve(filePath), 'r');
  } catch (error) {
    throw asReadError(error, 'file', 'open the file');
  }
  if (typeof file.file_id !== 'bigint' || file.file_id < 0n) {
    throw new ReadError('HDF5 could not open the file (not a readable HDF5 file).', 'file', 'format');
  }
  return file;
}

function safeClose(file: H5File): void {
  try {
    file.close();
  } catch {
    // A handle HDF5 refuses to close is already unusable; nothing else to release.
  }
}

/** HDF5 reports errors as a trace; the innermost line says what actually went wrong. */
export function hdf5Reason(error: unknown): string {
  const text = error instanceof Error ? error.message : String(error);
  const lines = text.split('\n').filter((l) => /#\d+:/.test(l));
  const last = lines[lines.length - 1];
  const reason = last ? last.replace(/^.*\(\):\s*/, '').trim() : text.split('\n')[0]?.trim();
  return reason && reason.length > 0 ? reason : 'unknown HDF5 error';
}

/**
 * An error thrown from inside h5wasm. With the throwing error handler, HDF5's cleanup after the
 * failing call is skipped, so objects of the file may stay open (and the file with them) after
 * close(); hence the distinct code `damaged`, on which the worker can recycle itself.
 */
function asReadError(error: unknown, where: string, what: string): ReadError {
  if (error instanceof ReadError) return error;
  return new ReadError(
    `HDF5 could not ${what} (${hdf5Reason(error)}); the file is damaged or incomplete.`,
    where,
    'damaged',
  );
}

// ---------------------------------------------------------------------------------------------
// Planning: find the layout, the variables, the steps and the grid.

interface RootEntry {
  name: string;
  entity: unknown;
}

function planFile(h5wasm: H5wasm, file: H5File, manifest: IngestManifest | undefined, limits: IngestLimits): FilePlan {
  const layout = manifest?.layout;
  if (layout === 'long' || layout === 'wide') {
    throw new ReadError(`The manifest says layout "${layout}", a CSV layout, but the file is HDF5.`, 'file', 'layout');
  }
  const entries: RootEntry[] = file.keys().map((name) => ({ name, entity: file.get(name) }));
  const stepGroups = entries.filter((e) => e.entity instanceof h5wasm.Group && STEP_GROUP.test(e.name));
  const names = resolveColumnNames(manifest);
  if (layout === 'group-per-step' || (layout === undefined && stepGroups.length > 0)) {
    if (stepGroups.length === 0) {
      throw new ReadError(
        'The manifest says layout "group-per-step" but the file has no group named ' +
          'step_<n> (such as /step_000010) at its root.',
        '/',
        'layout',
      );
    }
    return planGroupPerStep(h5wasm, file, entries, stepGroups, names, manifest, limits);
  }
  return planDatasetPerVariable(h5wasm, file, entries, names, manifest, limits);
}

function isReserved(name: string, names: ColumnNames): boolean {
  const n = name.toLowerCase();
  return [names.step, names.time, names.x, names.y, names.z].some((r) => r.toLowerCase() === n);
}

function findEntry(entries: readonly RootEntry[], name: string): RootEntry | undefined {
  const n = name.toLowerCase();
  return entries.find((e) => e.name === name) ?? entries.find((e) => e.name.toLowerCase() === n);
}

function describeType(meta: Metadata): string {
  if (meta.type === FLOAT_CLASS) return `${meta.size * 8}-bit floats`;
  if (meta.type === INTEGER_CLASS) {
    return `${meta.size * 8}-bit ${meta.signed ? '' : 'unsigned '}integers`;
  }
  if (meta.type === STRING_CLASS) return 'strings';
  if (meta.type === COMPOUND_CLASS) return 'compound records';
  return `values of HDF5 type class ${meta.type}`;
}

function shapeText(shape: readonly number[] | null): string {
  return shape === null ? 'a null dataspace' : `shape [${shape.join(', ')}]`;
}

function precisionOf(meta: Metadata): Precision | null {
  if (meta.type !== FLOAT_CLASS) return null;
  if (meta.size === 8) return { kind: 'float64' };
  if (meta.size === 4) return { kind: 'float32' };
  return null;
}

/** Why a dataset cannot be a variable with `rank` spatial axes after the step axis, or null. */
function variableProblem(meta: Metadata, stepAxis: boolean): string | null {
  const shape = meta.shape;
  const expected = stepAxis ? '[steps, nx], [steps, ny, nx] or [steps, nz, ny, nx]' : '[nx], [ny, nx] or [nz, ny, nx]';
  if (precisionOf(meta) === null) {
    return `holds ${describeType(meta)}; a variable holds float32 or float64 values`;
  }
  const rank = shape?.length ?? 0;
  const min = stepAxis ? 2 : 1;
  if (shape === null || rank < min || rank > min + 2) {
    return `has ${shapeText(shape)} (${rank} dimension${rank === 1 ? '' : 's'}); a variable is shaped ${expected}`;
  }
  return null;
}

function planDatasetPerVariable(
  h5wasm: H5wasm,
  file: H5File,
  entries: readonly RootEntry[],
  names: ColumnNames,
  manifest: IngestManifest | undefined,
  limits: IngestLimits,
): FilePlan {
  const notes: string[] = [];
  const chosen: { name: string; dataset: Dataset }[] = [];
  if (manifest?.variables) {
    for (const wanted of manifest.variables) {
      const entry = findEntry(entries, wanted);
      if (!entry || !(entry.entity instanceof h5wasm.Dataset)) {
        throw new ReadError(
          `The manifest names variable ${JSON.stringify(wanted)}, but the file has no dataset ` +
            `/${wanted} at its root (root holds ${listEntries(h5wasm, entries)}).`,
          `/${wanted}`,
          'dataset',
        );
      }
      const problem = variableProblem(entry.entity.metadata, true);
      if (problem) throw new ReadError(`Dataset /${entry.name} ${problem}.`, `/${entry.name}`, 'dataset');
      chosen.push({ name: entry.name, dataset: entry.entity });
    }
  } else {
    const skipped: string[] = [];
    for (const entry of entries) {
      if (!(entry.entity instanceof h5wasm.Dataset) || isReserved(entry.name, names)) continue;
      const dataset = entry.entity;
      if (isDimensionScale(dataset)) continue;
      const meta = dataset.metadata;
      const problem = variableProblem(meta, true);
      // Without a variable list, anything that cannot be a variable (a string description,
      // an integer mask, a 1D parameter) is skipped and noted rather than refused.
      if (problem) {
        skipped.push(`/${entry.name} ${problem}`);
        continue;
      }
      chosen.push({ name: entry.name, dataset });
    }
    if (chosen.length === 0) {
      const detail = skipped.length > 0 ? ` Not usable: ${skipped.join('; ')}.` : '';
      throw new ReadError(
        'No variable found in the HDF5 file: expected float32/float64 datasets shaped ' +
          '[steps, nx], [steps, ny, nx] or [steps, nz, ny, nx] at the root, or groups named ' +
          `step_<n> holding one dataset per variable.${detail}`,
        '/',
        'dataset',
      );
    }
    for (const s of skipped) notes.push(`skipped dataset ${s}`);
  }
  checkVariableLimit(chosen.length, limits);

  const first = chosen[0] as { name: string; dataset: Dataset };
  const shape = first.dataset.shape as number[];
  for (const v of chosen) {
    const s = v.dataset.shape as number[];
    if (s.length !== shape.length || s.some((n, i) => n !== shape[i])) {
      throw new ReadError(
        `Dataset /${v.name} has ${shapeText(s)} but /${first.name} has ${shapeText(shape)}; ` +
          'all variables of a file must share the steps and the grid.',
        `/${v.name}`,
        'grid',
      );
    }
  }
  const stepCount = shape[0] as number;
  const spatialShape = shape.slice(1);
  checkShapeLimits(`/${first.name}`, stepCount, spatialShape, limits);

  const times = readStepVector(h5wasm, entries, names.time, stepCount, 'time');
  const indices = readStepVector(h5wasm, entries, names.step, stepCount, 'step');
  if (indices) checkStepNumbers(indices, `/${names.step}`);
  const steps: StepPlan[] = [];
  for (let k = 0; k < stepCount; k++) {
    steps.push({ index: indices ? (indices[k] as number) : k, time: times ? (times[k] as number) : NaN });
  }

  const grid = buildGrid(h5wasm, file, entries, first.dataset, 1, spatialShape, names, notes);
  return {
    layout: 'dataset-per-variable',
    variables: chosen.map((v) => ({
      name: v.name,
      path: `/${v.name}`,
      precision: precisionOf(v.dataset.metadata) as Precision,
    })),
    spatialShape,
    steps,
    grid,
    notes: [
      ...notes,
      ...unusedOptionNotes(
        manifest,
        chosen.map((v) => v.name),
      ),
    ],
  };
}

function planGroupPerStep(
  h5wasm: H5wasm,
  file: H5File,
  entries: readonly RootEntry[],
  stepGroups: readonly RootEntry[],
  names: ColumnNames,
  manifest: IngestManifest | undefined,
  limits: IngestLimits,
): FilePlan {
  const notes: string[] = [];
  const ordered = stepGroups
    .map((e) => ({ name: e.name, group: e.entity as Group, index: Number(STEP_GROUP.exec(e.name)?.[1]) }))
    .sort((a, b) => a.index - b.index);
  for (let i = 1; i < ordered.length; i++) {
    const a = ordered[i - 1] as { name: string; index: number };
    const b = ordered[i] as { name: string; index: number };
    if (a.index === b.index) {
      throw new ReadError(
        `Groups /${a.name} and /${b.name} both hold step ${a.index}; each step needs one group.`,
        `/${b.name}`,
        'steps',
      );
    }
  }
  if (ordered.some((g) => !Number.isSafeInteger(g.index))) {
    throw new ReadError('A step group number is out of range.', '/', 'steps');
  }
  if (ordered.length > limits.maxSteps) {
    throw new ReadError(
      `The file has ${ordered.length} step groups; the limit is ${limits.maxSteps} steps per file.`,
      '/',
      'limit',
    );
  }
  const firstGroup = ordered[0] as { name: string; group: Group };
  const inner: RootEntry[] = firstGroup.group.keys().map((name) => ({ name, entity: firstGroup.group.get(name) }));
  const chosen: { name: string; dataset: Dataset }[] = [];
  if (manifest?.variables) {
    for (const wanted of manifest.variables) {
      const entry = findEntry(inner, wanted);
      if (!entry || !(entry.entity instanceof h5wasm.Dataset)) {
        throw new ReadError(
          `The manifest names variable ${JSON.stringify(wanted)}, but group /${firstGroup.name} ` +
            `has no dataset of that name.`,
          `/${firstGroup.name}/${wanted}`,
          'dataset',
        );
      }
      const problem = variableProblem(entry.entity.metadata, false);
      if (problem) {
        throw new ReadError(
          `Dataset /${firstGroup.name}/${entry.name} ${problem}.`,
          `/${firstGroup.name}/${entry.name}`,
          'dataset',
        );
      }
      chosen.push({ name: entry.name, dataset: entry.entity });
    }
  } else {
    const skipped: string[] = [];
    for (const entry of inner) {
      if (!(entry.entity instanceof h5wasm.Dataset) || isReserved(entry.name, names)) continue;
      const problem = variableProblem(entry.entity.metadata, false);
      if (problem) {
        skipped.push(`/${firstGroup.name}/${entry.name} ${problem}`);
        continue;
      }
      chosen.push({ name: entry.name, dataset: entry.entity });
    }
    if (chosen.length === 0) {
      const detail = skipped.length > 0 ? ` Not usable: ${skipped.join('; ')}.` : '';
      throw new ReadError(
        `Group /${firstGroup.name} holds no variable: expected float32/float64 datasets shaped ` +
          `[nx], [ny, nx] or [nz, ny, nx].${detail}`,
        `/${firstGroup.name}`,
        'dataset',
      );
    }
    for (const s of skipped) notes.push(`skipped dataset ${s}`);
  }
  checkVariableLimit(chosen.length, limits);
  const first = chosen[0] as { name: string; dataset: Dataset };
  const spatialShape = first.dataset.shape as number[];
  for (const v of chosen) {
    const s = v.dataset.shape as number[];
    if (s.length !== spatialShape.length || s.some((n, i) => n !== spatialShape[i])) {
      throw new ReadError(
        `Dataset /${firstGroup.name}/${v.name} has ${shapeText(s)} but ` +
          `/${firstGroup.name}/${first.name} has ${shapeText(spatialShape)}; all variables ` +
          'must share the grid.',
        `/${firstGroup.name}/${v.name}`,
        'grid',
      );
    }
  }
  checkShapeLimits(`/${firstGroup.name}/${first.name}`, ordered.length, spatialShape, limits);

  const steps: StepPlan[] = ordered.map((g) => ({
    index: g.index,
    time: groupTime(h5wasm, g.group, names.time),
    group: `/${g.name}`,
  }));
  // Coordinates live at the root (shared) or, failing that, in the first step's group.
  const coordinateEntries = [...entries, ...inner.filter((e) => !findEntry(entries, e.name))];
  const grid = buildGrid(h5wasm, file, coordinateEntries, first.dataset, 0, spatialShape, names, notes);
  return {
    layout: 'group-per-step',
    variables: chosen.map((v) => ({
      name: v.name,
      path: v.name,
      precision: precisionOf(v.dataset.metadata) as Precision,
    })),
    spatialShape,
    steps,
    grid,
    notes: [
      ...notes,
      ...unusedOptionNotes(
        manifest,
        chosen.map((v) => v.name),
      ),
    ],
  };
}

function listEntries(h5wasm: H5wasm, entries: readonly RootEntry[]): string {
  if (entries.length === 0) return 'nothing';
  return entries
    .slice(0, 12)
    .map((e) => `/${e.name}${e.entity instanceof h5wasm.Group ? ' (group)' : ''}`)
    .join(', ');
}

function checkVariableLimit(count: number, limits: IngestLimits): void {
  if (count > limits.maxVariables) {
    throw new ReadError(
      `The file has ${count} variables; the limit is ${limits.maxVariables} per file. Name the ` +
        'ones to check in the manifest (variables).',
      '/',
      'limit',
    );
  }
}

function checkShapeLimits(
  where: string,
  stepCount: number,
  spatialShape: readonly number[],
  limits: IngestLimits,
): void {
  if (stepCount < 1 || spatialShape.some((n) => n < 1)) {
    throw new ReadError(
      `Dataset ${where} is empty (${stepCount} steps, grid [${spatialShape.join(', ')}]); ` +
        'expected at least one step and one cell.',
      where,
      'empty',
    );
  }
  if (stepCount > limits.maxSteps) {
    throw new ReadError(
      `Dataset ${where} holds ${stepCount} steps; the limit is ${limits.maxSteps} steps per file.`,
      where,
      'limit',
    );
  }
  const cells = spatialShape.reduce((p, n) => p * n, 1);
  if (cells > limits.maxCellsPerStep) {
    throw new ReadError(
      `Dataset ${where} has ${spatialShape.join(' × ')} = ${cells} cells per step; the limit is ` +
        `${limits.maxCellsPerStep} cells per step.`,
      where,
      'limit',
    );
  }
}

function isDimensionScale(dataset: Dataset): boolean {
  try {
    return dataset.get_scale_name() !== null;
  } catch {
    return false;
  }
}

/** Reads a whole 1D numeric dataset as float64 values. */
function readVector(dataset: Dataset): Float64Array | null {
  const value = dataset.value;
  if (value instanceof Float64Array) return value;
  if (value instanceof BigInt64Array || value instanceof BigUint64Array) {
    return Float64Array.from(value, (v) => Number(v));
  }
  if (ArrayBuffer.isView(value) && !(value instanceof DataView)) {
    return Float64Array.from(value as unknown as ArrayLike<number>);
  }
  if (typeof value === 'number') return Float64Array.of(value);
  return null;
}

/** `/time` or `/step`: one number per step, when present. */
function readStepVector(
  h5wasm: H5wasm,
  entries: readonly RootEntry[],
  name: string,
  stepCount: number,
  what: 'time' | 'step',
): Float64Array | null {
  const entry = findEntry(entries, name);
  if (!entry || !(entry.entity instanceof h5wasm.Dataset)) return null;
  const meta = entry.entity.metadata;
  const shape = meta.shape ?? [];
  const numeric = meta.type === FLOAT_CLASS || meta.type === INTEGER_CLASS;
  if (!numeric || shape.length !== 1 || shape[0] !== stepCount) {
    throw new ReadError(
      `Dataset /${entry.name} (the ${what} of each step) holds ${describeType(meta)} with ` +
        `${shapeText(shape)}; expected ${stepCount} numbers, one per step.`,
      `/${entry.name}`,
      'dataset',
    );
  }
  const values = readVector(entry.entity);
  if (values === null || values.length !== stepCount) {
    throw new ReadError(`Dataset /${entry.name} could not be read as numbers.`, `/${entry.name}`, 'dataset');
  }
  return values;
}

function checkStepNumbers(indices: Float64Array, where: string): void {
  for (let k = 0; k < indices.length; k++) {
    const v = indices[k] as number;
    if (!Number.isSafeInteger(v)) {
      throw new ReadError(
        `Dataset ${where}, index ${k}: step number ${v} is not an integer.`,
        `${where}, index ${k}`,
        'steps',
      );
    }
  }
  const bad = firstNonIncreasing(indices);
  if (bad > 0) {
    throw new ReadError(
      `Dataset ${where}, index ${bad}: step ${indices[bad]} does not come after step ` +
        `${indices[bad - 1]}; step numbers must strictly increase (no step twice).`,
      `${where}, index ${bad}`,
      'steps',
    );
  }
}

function groupTime(h5wasm: H5wasm, group: Group, timeName: string): number {
  const attrNames = Object.keys(group.attrs);
  const attr = attrNames.find((a) => a.toLowerCase() === timeName.toLowerCase());
  if (attr !== undefined) {
    const value = numericAttribute(group.get_attribute(attr, false));
    if (value !== null && value.length === 1) return value[0] as number;
    throw new ReadError(
      `Attribute ${attr} of group ${group.path} is not a single number; expected the step's time.`,
      `${group.path}@${attr}`,
      'dataset',
    );
  }
  const dataset = group.get(timeName);
  if (dataset instanceof h5wasm.Dataset) {
    const value = readVector(dataset);
    if (value !== null && value.length === 1) return value[0] as number;
    throw new ReadError(
      `Dataset ${dataset.path} is not a single number; expected the step's time.`,
      dataset.path,
      'dataset',
    );
  }
  return Number.NaN;
}

function numericAttribute(value: unknown): number[] | null {
  if (typeof value === 'number') return [value];
  if (typeof value === 'bigint') return [Number(value)];
  if (typeof value === 'boolean') return [value ? 1 : 0];
  if (ArrayBuffer.isView(value) && !(value instanceof DataView)) {
    return Array.from(value as unknown as ArrayLike<number | bigint>, (v) => Number(v));
  }
  if (Array.isArray(value) && value.every((v) => typeof v === 'number')) return value as number[];
  return null;
}

function attributeOf(target: Dataset | Group, name: string): unknown {
  const key = Object.keys(target.attrs).find((a) => a.toLowerCase() === name.toLowerCase());
  return key === undefined ? undefined : target.get_attribute(key, false);
}

function defaultAxisNames(rank: number, names: ColumnNames): string[] {
  return [names.z, names.y, names.x].slice(3 - rank);
}

/**
 * The grid: for each spatial axis, coordinates from the dimension scale attached to the
 * variable (NetCDF-4 writes these) or from a dataset named like the axis; `periodic` and
 * `d<axis>` attributes from the variable or the root.
 */
function buildGrid(
  h5wasm: H5wasm,
  file: H5File,
  entries: readonly RootEntry[],
  variable: Dataset,
  firstSpatialDim: number,
  spatialShape: readonly number[],
  names: ColumnNames,
  notes: string[],
): Grid {
  const rank = spatialShape.length;
  const axisNames = defaultAxisNames(rank, names);
  const coordinates: (Float64Array | null)[] = [];
  for (let a = 0; a < rank; a++) {
    let coordinateSet: Dataset | null = null;
    const attached = attachedScale(h5wasm, file, variable, firstSpatialDim + a);
    if (attached) {
      coordinateSet = attached;
      axisNames[a] = attached.path.split('/').pop() || (axisNames[a] as string);
    } else {
      const entry = findEntry(entries, axisNames[a] as string);
      if (entry && entry.entity instanceof h5wasm.Dataset) coordinateSet = entry.entity;
    }
    coordinates.push(coordinateSet ? readCoordinates(coordinateSet, spatialShape[a] as number, notes) : null);
  }
  const periodic = periodicFlags(attributeOf(variable, 'periodic') ?? attributeOf(file, 'periodic'), axisNames, notes);
  const axes: GridAxis[] = axisNames.map((name, a) => {
    const coords = coordinates[a];
    if (coords) return axisFromCoordinates(name, coords, periodic[a] as boolean);
    const axis: GridAxis = { name, size: spatialShape[a] as number, periodic: periodic[a] as boolean };
    const width = numericAttribute(attributeOf(variable, `d${name}`) ?? attributeOf(file, `d${name}`));
    if (width && width.length === 1 && (width[0] as number) > 0 && Number.isFinite(width[0])) {
      axis.spacing = width[0] as number;
    }
    return axis;
  });
  return { axes };
}

function attachedScale(h5wasm: H5wasm, file: H5File, variable: Dataset, dim: number): Dataset | null {
  let paths: string[];
  try {
    paths = variable.get_attached_scales(dim);
  } catch {
    return null;
  }
  const first = paths[0];
  if (!first) return null;
  const scale = file.get(first);
  return scale instanceof h5wasm.Dataset ? scale : null;
}

function readCoordinates(dataset: Dataset, size: number, notes: string[]): Float64Array | null {
  const nameAttr = attributeOf(dataset, 'NAME');
  if (typeof nameAttr === 'string' && nameAttr.startsWith(NETCDF_PHONY_DIMENSION)) {
    // NetCDF-4 creates such a placeholder for a dimension without a coordinate variable.
    return null;
  }
  const meta = dataset.metadata;
  const shape = meta.shape ?? [];
  if ((meta.type !== FLOAT_CLASS && meta.type !== INTEGER_CLASS) || shape.length !== 1 || shape[0] !== size) {
    throw new ReadError(
      `Coordinate dataset ${dataset.path} holds ${describeType(meta)} with ${shapeText(shape)}; ` +
        `expected ${size} numbers (one cell centre per cell).`,
      dataset.path,
      'grid',
    );
  }
  const values = readVector(dataset);
  if (values === null) {
    notes.push(`coordinate dataset ${dataset.path} could not be read and was ignored`);
    return null;
  }
  for (let i = 0; i < values.length; i++) {
    if (!Number.isFinite(values[i] as number)) {
      throw new ReadError(
        `Coordinate dataset ${dataset.path}, index ${i}: ${values[i]} is not finite.`,
        `${dataset.path}, index ${i}`,
        'grid',
      );
    }
  }
  const bad = firstNonIncreasing(values);
  if (bad > 0) {
    throw new ReadError(
      `Coordinate dataset ${dataset.path}, index ${bad}: ${values[bad]} does not come after ` +
        `${values[bad - 1]}; cell centres must strictly increase along each axis.`,
      `${dataset.path}, index ${bad}`,
      'grid',
    );
  }
  return values;
}

/** `periodic` attribute: one flag for all axes, one per axis, or axis names ("x,y"). */
function periodicFlags(value: unknown, axisNames: readonly string[], notes: string[]): boolean[] {
  const none = axisNames.map(() => false);
  if (value === undefined || value === null) return none;
  if (typeof value === 'string') {
    const listed = value
      .split(/[\s,;]+/)
      .map((s) => s.trim().toLowerCase())
      .filter((s) => s !== '');
    if (['1', 'true', 'yes', 'all'].includes(listed[0] ?? '') && listed.length === 1) {
      return axisNames.map(() => true);
    }
    if (['0', 'false', 'no', 'none'].includes(listed[0] ?? '') && listed.length === 1) return none;
    return axisNames.map((n) => listed.includes(n.toLowerCase()));
  }
  const numbers = numericAttribute(value);
  if (numbers && numbers.length === 1) return axisNames.map(() => numbers[0] !== 0);
  if (numbers && numbers.length === axisNames.length) return numbers.map((n) => n !== 0);
  notes.push(
    `attribute periodic was not understood (expected 0/1, one flag per axis, or axis names) ` + 'and was ignored',
  );
  return none;
}

// ---------------------------------------------------------------------------------------------
// Reading a step.

function readStep(h5wasm: H5wasm, file: H5File, plan: FilePlan, k: number): SnapshotStep {
  const step = plan.steps[k] as StepPlan;
  const cells = plan.spatialShape.reduce((p, n) => p * n, 1);
  const fields: Record<string, FieldArray> = {};
  for (const v of plan.variables) {
    const where =
      plan.layout === 'dataset-per-variable' ? `dataset ${v.path}, step index ${k}` : `dataset ${step.group}/${v.path}`;
    let data: unknown;
    try {
      if (plan.layout === 'dataset-per-variable') {
        const dataset = file.get(v.path) as Dataset;
        data = dataset.slice([[k, k + 1], ...plan.spatialShape.map((): [] => [])]);
      } else {
        data = readGroupVariable(h5wasm, file, step.group as string, v, plan.spatialShape, where);
      }
    } catch (error) {
      throw asReadError(error, where, `read ${where}`);
    }
    if (!(data instanceof Float64Array || data instanceof Float32Array) || data.length !== cells) {
      throw new ReadError(
        `${capitalise(where)} did not read as ${cells} float values; the file may be damaged.`,
        where,
        'dataset',
      );
    }
    fields[v.name] = data;
  }
  return { index: step.index, time: step.time, fields };
}

function readGroupVariable(
  h5wasm: H5wasm,
  file: H5File,
  group: string,
  v: VariablePlan,
  spatialShape: readonly number[],
  where: string,
): unknown {
  const dataset = file.get(`${group}/${v.path}`);
  if (!(dataset instanceof h5wasm.Dataset)) {
    throw new ReadError(
      `Group ${group} has no dataset ${v.path}; every step group must hold every variable.`,
      where,
      'dataset',
    );
  }
  const meta = dataset.metadata;
  const shape = meta.shape ?? [];
  const precision = precisionOf(meta);
  if (
    precision?.kind !== v.precision.kind ||
    shape.length !== spatialShape.length ||
    shape.some((n, i) => n !== spatialShape[i])
  ) {
    throw new ReadError(
      `Dataset ${group}/${v.path} holds ${describeType(meta)} with ${shapeText(shape)}; the ` +
        `first step group has ${v.precision.kind} with shape [${spatialShape.join(', ')}], and ` +
        'every step must match it.',
      where,
      'grid',
    );
  }
  return dataset.value;
}

function capitalise(text: string): string {
  return text.charAt(0).toUpperCase() + text.slice(1);
}
