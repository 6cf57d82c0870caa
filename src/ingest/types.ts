import type { FieldArray, Grid, Precision } from '@/src/analysis/types';

/**
 * What every reader (CSV long, CSV wide, HDF5) hands to the analysis: first a header that
 * describes the grid and the variables, then the steps one at a time. A step carries every
 * variable of the file at that time level, because CSV rows hold all variables of a cell.
 */
export interface SnapshotHeader {
  format: SnapshotFormat;
  grid: Grid;
  variables: { name: string; precision: Precision }[];
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

export type SnapshotFormat = 'csv-long' | 'csv-wide' | 'hdf5';

/** Thrown by readers for any problem with the input itself; the message is shown to the user. */
export class ReadError extends Error {
  override readonly name = 'ReadError';
  constructor(
    message: string,
    /** Where: `line 12, column "rho"`, `dataset /salinity, step 3`, ... */
    readonly where?: string,
  ) {
    super(message);
  }
}
