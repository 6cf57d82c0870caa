import { describe, expect, it } from 'vitest';
import { DEFAULT_INGEST_LIMITS, ingestLimitsFromEnv, resolveIngestLimits } from '@/src/ingest/limits';

describe('ingestLimitsFromEnv', () => {
  it('takes the limits a deployment sets and leaves the others at their defaults', () => {
    const limits = resolveIngestLimits(
      ingestLimitsFromEnv({ VARIGATE_MAX_STEPS: '500', VARIGATE_MAX_OBJECT_BYTES: ' 1048576 ' }),
    );
    expect(limits.maxSteps).toBe(500);
    expect(limits.maxFileBytes).toBe(1_048_576);
    expect(limits.maxCellsPerStep).toBe(DEFAULT_INGEST_LIMITS.maxCellsPerStep);
  });

  it('refuses a malformed value, naming the variable, instead of dropping the limit', () => {
    expect(() => ingestLimitsFromEnv({ VARIGATE_MAX_CELLS_PER_STEP: '2e6x' })).toThrow(
      /VARIGATE_MAX_CELLS_PER_STEP must be a positive whole number of items, got "2e6x"/,
    );
    expect(() => ingestLimitsFromEnv({ VARIGATE_MAX_HEADER_BYTES: '-1' })).toThrow(/VARIGATE_MAX_HEADER_BYTES/);
  });

  it('ignores empty settings', () => {
    expect(ingestLimitsFromEnv({ VARIGATE_MAX_STEPS: '' })).toEqual({});
  });
});
