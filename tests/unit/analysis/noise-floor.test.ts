import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { unitRoundoff, valueError, valueFloor } from '@/src/analysis/noise-floor';
import type { Precision } from '@/src/analysis/types';
import { analyse, exact, ExactDecimal, exactTotalVariation, expectUlps, line, random } from './support';

describe('unitRoundoff', () => {
  it('is 2^-24 for float32 and 2^-53 for float64 (IEEE 754 binary32/binary64)', () => {
    expect(unitRoundoff({ kind: 'float32' })).toBe(2 ** -24);
    expect(unitRoundoff({ kind: 'float64' })).toBe(2 ** -53);
  });

  it('is half a unit in the last of D significant digits, 0.5 * 10^(1-D), for decimal text', () => {
    expectUlps(unitRoundoff({ kind: 'decimal', significantDigits: 6 }), 5e-6, 4);
    expectUlps(unitRoundoff({ kind: 'decimal', significantDigits: 6 }, 3), 5e-3, 4);
  });

  it('never goes below float64 resolution for very long decimal strings', () => {
    expect(unitRoundoff({ kind: 'decimal', significantDigits: 30 })).toBe(2 ** -53);
  });

  it('rejects a digit count that is not a positive integer', () => {
    expect(() => unitRoundoff({ kind: 'decimal', significantDigits: 0 })).toThrow(RangeError);
    expect(() => unitRoundoff({ kind: 'decimal', significantDigits: 2.5 })).toThrow(RangeError);
  });
});

describe('valueFloor', () => {
  it('is twice the per-value error and scales with the magnitude', () => {
    const u = 2 ** -24;
    expect(valueFloor(u, 3)).toBe(2 * valueError(u, 3));
    expect(valueFloor(u, 6)).toBe(2 * valueFloor(u, 3));
    expect(valueFloor(u, 0)).toBe(0);
  });
});

/** Fields that stress the bound: near-flat random walks, plateaus, steps and smooth slopes. */
function field(seed: number, n: number, kind: number): Float64Array {
  const r = random(seed);
  const x = new Float64Array(n);
  let walk = 0.3;
  for (let i = 0; i < n; i++) {
    if (kind === 0)
      walk += (Math.floor(r() * 7) - 3) * 1e-8; // steps of a few float32 ulps
    else if (kind === 1)
      walk = i % 17 < 8 ? 0.3 : 0.7 + 1e-9 * r(); // plateaus and jumps
    else walk = Math.sin(0.05 * i) + 1e-6 * r(); // smooth with small noise
    x[i] = walk;
  }
  return x;
}

function storedBound(stored: ArrayLike<number>, precision: Precision, periodic: boolean) {
  const s = analyse([Float64Array.from(stored)], line(stored.length, periodic), { precision });
  return { tvNoise: s.series.tvNoise[0]!, massNoise: s.series.massNoise[0]!, mass: s.series.mass[0]! };
}

describe('TV and mass noise bounds (noise-floor.ts derivation)', () => {
  it('bound the TV change caused by rounding to float32', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 1e6 }),
        fc.integer({ min: 0, max: 2 }),
        fc.boolean(),
        (seed, kind, periodic) => {
          const x = field(seed, 120, kind);
          const stored = Float32Array.from(x);
          const { tvNoise } = storedBound(stored, { kind: 'float32' }, periodic);
          const change = exactTotalVariation(stored, periodic).minus(exactTotalVariation(x, periodic)).abs();
          expect(change.toNumber()).toBeLessThanOrEqual(tvNoise);
        },
      ),
      { numRuns: 60 },
    );
  });

  it('bound the TV change caused by writing D significant digits', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 1e6 }),
        fc.integer({ min: 0, max: 2 }),
        fc.integer({ min: 3, max: 9 }),
        (seed, kind, digits) => {
          const x = field(seed, 120, kind);
          const stored = Float64Array.from(x, (v) => Number(v.toPrecision(digits)));
          const { tvNoise } = storedBound(stored, { kind: 'decimal', significantDigits: digits }, true);
          const change = exactTotalVariation(stored, true).minus(exactTotalVariation(x, true)).abs();
          expect(change.toNumber()).toBeLessThanOrEqual(tvNoise);
        },
      ),
      { numRuns: 60 },
    );
  });

  it('bound the TV change of fixed-point text, whose small values carry fewer digits', () => {
    const x = field(7, 200, 2).map((v) => 5 * v);
    const stored = Float64Array.from(x, (v) => Number(v.toFixed(4)));
    // The largest values print with 5 significant digits (e.g. 4.9871): that is the digit count.
    const { tvNoise } = storedBound(stored, { kind: 'decimal', significantDigits: 5 }, true);
    const change = exactTotalVariation(stored, true).minus(exactTotalVariation(x, true)).abs();
    expect(change.toNumber()).toBeLessThanOrEqual(tvNoise);
  });

  it('bound the mass change caused by rounding to float32', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 1e6 }), fc.integer({ min: 0, max: 2 }), (seed, kind) => {
        const x = field(seed, 120, kind);
        const stored = Float32Array.from(x);
        const { massNoise } = storedBound(stored, { kind: 'float32' }, true);
        let exactChange = new ExactDecimal(0);
        for (let i = 0; i < x.length; i++) exactChange = exactChange.plus(exact(stored[i]!).minus(exact(x[i]!)));
        expect(exactChange.abs().toNumber()).toBeLessThanOrEqual(massNoise);
      }),
      { numRuns: 40 },
    );
  });

  it('grows with the number of run ends and flat edges, not with the number of cells', () => {
    const ramp = (n: number) => Float64Array.from({ length: n }, (_, i) => i / n);
    const small = storedBound(ramp(100), { kind: 'float32' }, false).tvNoise;
    const large = storedBound(ramp(100_000), { kind: 'float32' }, false).tvNoise;
    // A monotone ramp has two run ends whatever its length: the bound stays put.
    expect(large).toBeLessThan(2 * small);
  });
});
