import type { FieldArray, Grid, Precision, VariableOptions } from '@/src/analysis/types';

/**
 * What every reader (CSV long, CSV wide, HDF5) hands to the analysis: first a header that
 * describes the grid and the variables, then the steps one at a time. A step carries every
 * variable of the file at that time level, because CSV rows hold all variables of a cell.
 */
export interface SnapshotHeader {
  format: SnapshotFormat;
  grid: Grid;
  variables: SnapshotVariable[];
  /** Which arrangement of the format was found (see docs/formats.md). */
  layout?: SnapshotLayout;
  /**
   * Number of steps when the reader knows it before reading them (HDF5, wide CSV). A long CSV
   * is read as a stream, so its step count is only known at the end.
   */
  stepCount?: number;
  /** `gzip` when the upload was a gzip-compressed CSV. */
  compression?: 'gzip';
  /** For CSV: the field separator and decimal mark that were detected. */
  text?: { delimiter: CsvDelimiter; decimalMark: '.' | ',' };
  /**
   * Things the reader chose not to use and that a person may want to know about (an integer
   * dataset skipped, manifest options for a variable the file lacks). Never errors.
   */
  notes?: string[];
}

export interface SnapshotVariable {
  name: string;
  /**
   * Storage precision. For CSV this is `decimal` with the largest number of significant digits
   * written in the FIRST step (long layout, read as a stream) or in the whole file (wide layout);
   * each step also reports its own count in `SnapshotStep.significantDigits`.
   */
  precision: Precision;
  /** Per-variable options from the manifest, passed through unchanged. */
  options?: VariableOptions;
}

export interface SnapshotStep {
  index: number;
  time: number;
  /** One array per variable name of the header, each of length cellCount(grid). */
  fields: Record<string, FieldArray>;
  /**
   * For text input: the largest number of significant digits written per variable in this step.
   * The analyser narrows the noise floor with it; binary formats leave it out.
   */
  significantDigits?: Record<string, number>;
}

/**
 * An opened upload: its header, then its steps in order, read lazily. Iterate `steps` once;
 * call `close()` when done or when stopping early (it releases the file and the HDF5 handle,
 * and is safe to call twice). Errors in the input surface as ReadError, either from the open
 * call or while iterating.
 */
export interface SnapshotReader {
  header: SnapshotHeader;
  steps: AsyncIterable<SnapshotStep>;
  close(): Promise<void>;
}

export type SnapshotFormat = 'csv-long' | 'csv-wide' | 'hdf5';

/** The arrangements Varigate reads; `layout` in the manifest forces one of them. */
export type SnapshotLayout = 'long' | 'wide' | 'dataset-per-variable' | 'group-per-step';

export type CsvDelimiter = ',' | ';' | '\t';

/**
 * Coarse class of a read problem, so callers can choose a status without parsing the message:
 * `limit` is "too large" (HTTP 413), `unsupported` a readable but refused variant, the rest bad
 * input (HTTP 422 or a run with verdict `error`). `damaged` is an error reported by the HDF5
 * library itself while reading a damaged file; the library may then keep that file's handle
 * open (h5wasm cannot release it), so a long-running worker should restart after a few.
 */
export type ReadErrorCode =
  | 'empty'
  | 'format'
  | 'encoding'
  | 'layout'
  | 'syntax'
  | 'value'
  | 'steps'
  | 'grid'
  | 'dataset'
  | 'truncated'
  | 'damaged'
  | 'limit'
  | 'unsupported';

/** Thrown by readers for any problem with the input itself; the message is shown to the user. */
export class ReadError extends Error {
  override readonly name = 'ReadError';
  constructor(
    message: string,
    /** Where: `line 12, column 4 ("rho")`, `dataset /salinity, step index 3`, ... */
    readonly where?: string,
    readonly code: ReadErrorCode = 'format',
  ) {
    super(message);
  }
}

/** True for errors the readers raise about the input (as opposed to defects in Varigate). */
export function isReadError(error: unknown): error is ReadError {
  return error instanceof ReadError;
}
