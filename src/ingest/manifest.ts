import { z } from 'zod';
import type { VariableOptions } from '@/src/analysis/types';

/**
 * The part of an upload's JSON manifest that tells the readers how to read the file. The API's
 * full manifest (build key, commit, branch, case) extends this schema; unknown keys are dropped
 * here, not rejected, so the two can grow independently.
 */

const columnName = z.string().trim().min(1).max(200);

export const variableOptionsSchema = z.object({
  periodic: z.record(z.string().min(1), z.boolean()).optional(),
  cellSize: z.number().positive().finite().optional(),
  bounds: z
    .object({ lower: z.number().finite().optional(), upper: z.number().finite().optional() })
    .refine((b) => b.lower === undefined || b.upper === undefined || b.lower <= b.upper, {
      message: 'bounds.lower must not exceed bounds.upper',
    })
    .optional(),
  velocitySign: z.union([z.literal(1), z.literal(-1)]).optional(),
  system: z.boolean().optional(),
  conservative: z.boolean().optional(),
}) satisfies z.ZodType<VariableOptions>;

export const snapshotLayoutSchema = z.enum(['long', 'wide', 'dataset-per-variable', 'group-per-step']);

export const ingestManifestSchema = z.object({
  /** Forces a layout instead of detecting it. */
  layout: snapshotLayoutSchema.optional(),
  /**
   * Names of the step, time and coordinate columns (CSV long layout) or datasets (HDF5), when
   * they differ from `step`, `time`, `x`, `y`, `z`. Matched without regard to case.
   */
  columns: z
    .object({
      step: columnName.optional(),
      time: columnName.optional(),
      x: columnName.optional(),
      y: columnName.optional(),
      z: columnName.optional(),
    })
    .optional(),
  /**
   * Variables to read, in this order. Absent: every column/dataset that is not a step, time or
   * coordinate. For the wide layout the first entry names its single variable.
   */
  variables: z
    .array(columnName)
    .min(1)
    .refine((names) => new Set(names.map((n) => n.toLowerCase())).size === names.length, {
      message: 'variables must not repeat a name',
    })
    .optional(),
  /** Per-variable options, passed through to the header for the analysis. */
  variableOptions: z.record(columnName, variableOptionsSchema).optional(),
});

export type IngestManifest = z.infer<typeof ingestManifestSchema>;

/** Step, time and coordinate names after the manifest's overrides. */
export interface ColumnNames {
  step: string;
  time: string;
  x: string;
  y: string;
  z: string;
}

export function resolveColumnNames(manifest: IngestManifest | undefined): ColumnNames {
  const c = manifest?.columns ?? {};
  return {
    step: c.step ?? 'step',
    time: c.time ?? 'time',
    x: c.x ?? 'x',
    y: c.y ?? 'y',
    z: c.z ?? 'z',
  };
}

/** Options for a variable given by the manifest, matched without regard to case. */
export function optionsFor(manifest: IngestManifest | undefined, variable: string): VariableOptions | undefined {
  const all = manifest?.variableOptions;
  if (!all) return undefined;
  const exact = all[variable];
  if (exact) return exact;
  const lower = variable.toLowerCase();
  for (const [name, options] of Object.entries(all)) {
    if (name.toLowerCase() === lower) return options;
  }
  return undefined;
}

/** Notes for manifest options that name no variable of the file (likely a typo). */
export function unusedOptionNotes(manifest: IngestManifest | undefined, variables: readonly string[]): string[] {
  const all = manifest?.variableOptions;
  if (!all) return [];
  const present = new Set(variables.map((v) => v.toLowerCase()));
  return Object.keys(all)
    .filter((name) => !present.has(name.toLowerCase()))
    .map((name) => `manifest variableOptions names "${name}", which is not a variable of the file`);
}
