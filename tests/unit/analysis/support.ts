/**
 * Helpers shared by the analysis tests: exact decimal values of doubles (for decimal.js
 * references), and a one-call analysis of a list of snapshots.
 */
import Decimal from 'decimal.js';
import { expect } from 'vitest';
import { createAnalyser, type AnalyserOptions } from '@/src/analysis/analyser';
import type { VariableSummary } from '@/src/analysis/summary';
import type { FieldArray, Grid, Precision, VariableOptions } from '@/src/analysis/types';

/** Enough digits to hold the exact sum of differences of doubles within a few hundred binades. */
export const ExactDecimal = Decimal.clone({ precision: 1200 });

/**
 * The exact value of a double as a Decimal, built from its binary representation (hexadecimal
 * significand and binary exponent), not from its shortest decimal string.
 */
export function exact(x: number): Decimal {
  if (!Number.isFinite(x)) throw new RangeError('exact() needs a finite number');
  if (x === 0) return new ExactDecimal(0);
  const view = new DataView(new ArrayBuffer(8));
  view.setFloat64(0, x);
  const hi = view.getUint32(0);
  const lo = view.getUint32(4);
  const sign = hi >>> 31 ? '-' : '';
  const biased = (hi >>> 20) & 0x7ff;
  const mantissa = (hi & 0xfffff).toString(16).padStart(5, '0') + lo.toString(16).padStart(8, '0');
  const lead = biased === 0 ? '0' : '1';
  const exponent = biased === 0 ? -1022 : biased - 1023;
  return new ExactDecimal(`${sign}0x${lead}.${mantissa}p${exponent}`);
}

/** Exact total variation of a line (wrap-around term when periodic), in decimal arithmetic. */
export function exactTotalVariation(values: ArrayLike<number>, periodic = false): Decimal {
  let sum = new ExactDecimal(0);
  const n = values.length;
  for (let i = 0; i + 1 < n; i++)
    sum = sum.plus(
      exact(values[i + 1]!)
        .minus(exact(values[i]!))
        .abs(),
    );
  if (periodic && n > 1)
    sum = sum.plus(
      exact(values[0]!)
        .minus(exact(values[n - 1]!))
        .abs(),
    );
  return sum;
}

export const U64 = 2 ** -53;

/**
 * Asserts |actual - expected| <= ulps * u64 * scale, where scale is the size of the expected value
 * (or of the data, for expected values that are zero by cancellation).
 */
export function expectUlps(
  actual: number | undefined,
  expected: number,
  ulps: number,
  scale = Math.abs(expected),
): void {
  expect(actual).toBeDefined();
  expect(Math.abs(actual! - expected)).toBeLessThanOrEqual(ulps * U64 * scale);
}

/** A 1D grid of `cells` cells. */
export function line(cells: number, periodic = true, spacing?: number): Grid {
  return { axes: [{ name: 'x', size: cells, periodic, ...(spacing === undefined ? {} : { spacing }) }] };
}

export interface AnalyseOptions extends AnalyserOptions {
  precision?: Precision;
  options?: VariableOptions;
  name?: string;
  /** Simulation time of snapshot k (default k). */
  time?: (k: number) => number;
}

/** Pushes every snapshot (step index = position) and returns the finished summary. */
export function analyse(snapshots: readonly FieldArray[], grid: Grid, opts: AnalyseOptions = {}): VariableSummary {
  const analyser = createAnalyser(
    {
      name: opts.name ?? 'phi',
      grid,
      precision: opts.precision ?? { kind: 'float64' },
      ...(opts.options === undefined ? {} : { options: opts.options }),
    },
    opts.policy === undefined ? {} : { policy: opts.policy },
  );
  snapshots.forEach((values, k) => analyser.push({ index: k, time: opts.time?.(k) ?? k, values }));
  return analyser.finish();
}

/** Rounds every value to float32, as a solver writing float32 snapshots would. */
export function toFloat32(snapshots: readonly Float64Array[]): Float32Array[] {
  return snapshots.map((s) => Float32Array.from(s));
}

/** Deterministic pseudo-random numbers in [0, 1) (a 32-bit linear congruential generator). */
export function random(seed: number): () => number {
  let state = seed >>> 0;
  return () => {
    state = (Math.imul(state, 1664525) + 1013904223) >>> 0;
    return state / 2 ** 32;
  };
}
