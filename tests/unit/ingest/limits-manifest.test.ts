import { describe, expect, it } from 'vitest';
import { DEFAULT_INGEST_LIMITS, ingestLimitsSchema, ingestManifestSchema, resolveIngestLimits } from '@/src/ingest';
import { formatBytes } from '@/src/ingest/limits';

describe('resolveIngestLimits', () => {
  it('keeps defaults for what is not overridden', () => {
    const limits = resolveIngestLimits({ maxSteps: 10 });
    expect(limits).toEqual({ ...DEFAULT_INGEST_LIMITS, maxSteps: 10 });
  });

  it('refuses a limit that is not a positive integer', () => {
    expect(() => resolveIngestLimits({ maxCellsPerStep: 0 })).toThrow(
      'ingest limit maxCellsPerStep must be a positive integer, got 0',
    );
    expect(() => resolveIngestLimits({ maxFileBytes: 1.5 })).toThrow(RangeError);
  });

  it('validates overrides coming from configuration', () => {
    expect(ingestLimitsSchema.safeParse({ maxFileBytes: 1024 }).success).toBe(true);
    expect(ingestLimitsSchema.safeParse({ maxFileBytes: -1 }).success).toBe(false);
  });

  it('formats sizes for messages', () => {
    expect(formatBytes(512)).toBe('512 bytes');
    expect(formatBytes(1536)).toBe('1.5 KiB');
    expect(formatBytes(2 * 1024 ** 3)).toBe('2 GiB');
  });
});

describe('ingestManifestSchema', () => {
  it('accepts columns, variables, a layout and per-variable options, dropping unknown keys', () => {
    const parsed = ingestManifestSchema.parse({
      layout: 'long',
      columns: { step: 'n', time: 't', x: 'lon' },
      variables: ['salinity', 'temperature'],
      variableOptions: {
        salinity: { bounds: { lower: 0 }, velocitySign: -1, periodic: { lon: true } },
      },
      buildKey: 'ci-1234',
    });
    expect(parsed).toEqual({
      layout: 'long',
      columns: { step: 'n', time: 't', x: 'lon' },
      variables: ['salinity', 'temperature'],
      variableOptions: { salinity: { bounds: { lower: 0 }, velocitySign: -1, periodic: { lon: true } } },
    });
  });

  it('refuses repeated variables, unknown layouts and inverted bounds', () => {
    expect(ingestManifestSchema.safeParse({ variables: ['u', 'U'] }).success).toBe(false);
    expect(ingestManifestSchema.safeParse({ layout: 'columns' }).success).toBe(false);
    expect(ingestManifestSchema.safeParse({ variableOptions: { u: { bounds: { lower: 1, upper: 0 } } } }).success).toBe(
      false,
    );
    expect(ingestManifestSchema.safeParse({ variableOptions: { u: { velocitySign: 2 } } }).success).toBe(false);
  });
});
