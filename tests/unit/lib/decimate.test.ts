import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { decimateKeepingExtrema, downsample2d, extremumIndices } from '@/src/lib/decimate';

/** Brute-force strict local extrema, plateaus counted once at their first cell. */
function bruteExtrema(v: number[]): number[] {
  const out: number[] = [];
  for (let i = 1; i < v.length - 1; i++) {
    if (v[i] === v[i - 1]) continue; // only the first cell of a plateau
    let j = i;
    while (j + 1 < v.length - 1 && v[j + 1] === v[i]) j++;
    const right = v[j + 1]!;
    if ((v[i]! > v[i - 1]! && v[i]! > right) || (v[i]! < v[i - 1]! && v[i]! < right)) out.push(i);
  }
  return out;
}

describe('extremumIndices', () => {
  it('finds peaks and troughs, counts a plateau peak once, and keeps both ends', () => {
    expect(extremumIndices([0, 1, 0, -1, 0])).toEqual([0, 1, 3, 4]);
    expect(extremumIndices([0, 2, 2, 2, 0])).toEqual([0, 1, 4]);
    // A step is not an extremum.
    expect(extremumIndices([0, 0, 1, 1])).toEqual([0, 3]);
  });

  it('agrees with a brute-force search on random profiles', () => {
    fc.assert(
      fc.property(fc.array(fc.integer({ min: -3, max: 3 }), { minLength: 3, maxLength: 60 }), (v) => {
        const inner = extremumIndices(v).filter((i) => i !== 0 && i !== v.length - 1);
        expect(inner).toEqual(bruteExtrema(v));
      }),
    );
  });
});

describe('decimateKeepingExtrema', () => {
  it('returns everything when the series already fits', () => {
    const r = decimateKeepingExtrema([3, 1, 2], 10);
    expect(r).toEqual({ index: [0, 1, 2], values: [3, 1, 2], complete: true });
  });

  it('keeps every local extremum of a long profile that has few of them', () => {
    const n = 100_000;
    const v = new Float64Array(n);
    for (let i = 0; i < n; i++) v[i] = Math.sin((2 * Math.PI * 7 * i) / n);
    v[54_321] = 5; // a spike, as an overshoot would be
    const r = decimateKeepingExtrema(v, 500);
    expect(r.index.length).toBeLessThanOrEqual(500);
    for (const e of extremumIndices(v)) expect(r.index).toContain(e);
    expect(Math.max(...r.values)).toBe(5);
  });

  it('keeps the global minimum and maximum of a noisy profile with more extrema than points', () => {
    fc.assert(
      fc.property(
        fc.array(fc.double({ min: -1e6, max: 1e6, noNaN: true }), { minLength: 200, maxLength: 2000 }),
        (arr) => {
          const r = decimateKeepingExtrema(arr, 64);
          expect(r.index.length).toBeLessThanOrEqual(64);
          expect(Math.max(...r.values)).toBe(Math.max(...arr));
          expect(Math.min(...r.values)).toBe(Math.min(...arr));
          for (let k = 1; k < r.index.length; k++) expect(r.index[k]!).toBeGreaterThan(r.index[k - 1]!);
        },
      ),
    );
  });

  it('keeps a NaN visible after decimation', () => {
    const v = Array.from({ length: 1000 }, (_, i) => Math.sin(i));
    v[500] = Number.NaN;
    const r = decimateKeepingExtrema(v, 100);
    expect(r.values.some((x) => Number.isNaN(x))).toBe(true);
  });
});

describe('downsample2d', () => {
  it('averages blocks of a 4x4 field into 2x2', () => {
    const v = [1, 1, 2, 2, 1, 1, 2, 2, 3, 3, 4, 4, 3, 3, 4, 4];
    expect(downsample2d(v, 4, 4, 2, 2)).toEqual({ rows: 2, cols: 2, values: [1, 2, 3, 4] });
  });
});
