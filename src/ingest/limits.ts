import { z } from 'zod';

/**
 * Every size bound the readers enforce, in one place. The server builds one from its validated
 * environment and passes it in; readers never look at process.env themselves.
 */
export interface IngestLimits {
  /** Size of the stored file in bytes (the compressed size for a .csv.gz). */
  maxFileBytes: number;
  /** Bytes of text after gunzip; stops a small archive from expanding without bound. */
  maxUncompressedBytes: number;
  /** Cells in one step (product of the axis sizes). */
  maxCellsPerStep: number;
  /** Stored time levels in one file. */
  maxSteps: number;
  /** Variables read from one file. */
  maxVariables: number;
  /**
   * Bytes of text of a wide-layout CSV. The wide layout keeps the whole file in memory (every
   * step is a column, so no step is complete before the last line), hence its own small bound.
   */
  maxWideLayoutBytes: number;
  /** Length of the CSV header line in bytes. */
  maxHeaderBytes: number;
}

const MiB = 1024 * 1024;
const GiB = 1024 * MiB;

export const DEFAULT_INGEST_LIMITS: Readonly<IngestLimits> = Object.freeze({
  maxFileBytes: 2 * GiB,
  maxUncompressedBytes: 8 * GiB,
  maxCellsPerStep: 2_097_152, // 128^3, or about 1448^2
  maxSteps: 100_000,
  maxVariables: 64,
  maxWideLayoutBytes: 16 * MiB,
  maxHeaderBytes: 64 * 1024,
});

/**
 * Suggested environment variable for each limit, for the server's start-up configuration
 * module (which validates the environment once and passes the numbers in).
 */
export const INGEST_LIMIT_ENV: Readonly<Record<keyof IngestLimits, string>> = Object.freeze({
  maxFileBytes: 'VARIGATE_MAX_OBJECT_BYTES',
  maxUncompressedBytes: 'VARIGATE_MAX_UNCOMPRESSED_BYTES',
  maxCellsPerStep: 'VARIGATE_MAX_CELLS_PER_STEP',
  maxSteps: 'VARIGATE_MAX_STEPS',
  maxVariables: 'VARIGATE_MAX_VARIABLES',
  maxWideLayoutBytes: 'VARIGATE_MAX_WIDE_LAYOUT_BYTES',
  maxHeaderBytes: 'VARIGATE_MAX_HEADER_BYTES',
});

const positiveInt = z.number().int().positive().max(Number.MAX_SAFE_INTEGER);

/** Validates a partial override (e.g. numbers coerced from the environment). */
export const ingestLimitsSchema = z.object({
  maxFileBytes: positiveInt.optional(),
  maxUncompressedBytes: positiveInt.optional(),
  maxCellsPerStep: positiveInt.optional(),
  maxSteps: positiveInt.optional(),
  maxVariables: positiveInt.optional(),
  maxWideLayoutBytes: positiveInt.optional(),
  maxHeaderBytes: positiveInt.optional(),
});

/**
 * The overrides an environment sets (INGEST_LIMIT_ENV names), validated; unset names keep their
 * defaults. A malformed value is an error naming the variable, so a typo never silently removes
 * a limit.
 */
export function ingestLimitsFromEnv(env: Record<string, string | undefined>): Partial<IngestLimits> {
  const out: Partial<IngestLimits> = {};
  for (const [key, name] of Object.entries(INGEST_LIMIT_ENV) as [keyof IngestLimits, string][]) {
    const raw = env[name]?.trim();
    if (!raw) continue;
    const value = Number(raw);
    if (!Number.isSafeInteger(value) || value <= 0) {
      throw new RangeError(
        `${name} must be a positive whole number of ${key.endsWith('Bytes') ? 'bytes' : 'items'}, got "${raw}"`,
      );
    }
    out[key] = value;
  }
  return out;
}

/** Defaults with the given overrides applied; undefined entries keep the default. */
export function resolveIngestLimits(overrides: Partial<IngestLimits> = {}): IngestLimits {
  const limits: IngestLimits = { ...DEFAULT_INGEST_LIMITS };
  for (const key of Object.keys(DEFAULT_INGEST_LIMITS) as (keyof IngestLimits)[]) {
    const value = overrides[key];
    if (value === undefined) continue;
    if (!Number.isSafeInteger(value) || value <= 0) {
      throw new RangeError(`ingest limit ${key} must be a positive integer, got ${String(value)}`);
    }
    limits[key] = value;
  }
  return limits;
}

/** `1536` → `1.5 KiB`; used in limit messages so people see sizes they can compare. */
export function formatBytes(bytes: number): string {
  if (bytes < 1024) return `${bytes} bytes`;
  const units = ['KiB', 'MiB', 'GiB', 'TiB'];
  let value = bytes / 1024;
  let unit = 0;
  while (value >= 1024 && unit < units.length - 1) {
    value /= 1024;
    unit += 1;
  }
  const text = value >= 100 ? value.toFixed(0) : value.toFixed(1).replace(/\.0$/, '');
  return `${text} ${units[unit]}`;
}
