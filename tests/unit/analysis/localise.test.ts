import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { frontSide, GROWTH_GAP, increase1d, increaseMarginals, maxSumWindow } from '@/src/analysis/localise';

/** Brute force: best sum over all windows of a line (no gap rule), for comparison. */
function bruteBest(g: number[]): number {
  let best = -Infinity;
  for (let a = 0; a < g.length; a++) {
    let s = 0;
    for (let b = a; b < g.length; b++) {
      s += g[b]!;
      best = Math.max(best, s);
    }
  }
  return best;
}

describe('maxSumWindow', () => {
  it('returns null for empty input and when nothing grew', () => {
    expect(maxSumWindow([], 0, false)).toBeNull();
    expect(maxSumWindow([0, -1, 0], 3, true)).toBeNull();
  });

  it('handles one value, all-equal values and NaN', () => {
    expect(maxSumWindow([3], 1, true)).toEqual({ first: 0, last: 0, sum: 3 });
    expect(maxSumWindow([-3], 1, false)).toBeNull();
    expect(maxSumWindow([0, 0, 0, 0, 0], 5, true)).toBeNull();
    expect(maxSumWindow([2, 2, 2], 3, false)).toEqual({ first: 0, last: 2, sum: 6 });
    // NaN counts as no growth: it neither joins nor breaks a window's sum.
    expect(maxSumWindow([0, Number.NaN, 0, 0, 0, 0, 4, 0], 8, false)).toEqual({ first: 6, last: 6, sum: 4 });
  });

  it('finds a single positive cell', () => {
    expect(maxSumWindow([0, 0, 2, 0], 4, false)).toEqual({ first: 2, last: 2, sum: 2 });
  });

  it('spans a short dip between two growing cells', () => {
    expect(maxSumWindow([0, 3, -1, 2, 0], 5, false)).toEqual({ first: 1, last: 3, sum: 4 });
  });

  it('keeps two growth regions apart when at least GROWTH_GAP quiet cells separate them', () => {
    const g = [1, ...new Array(GROWTH_GAP).fill(0), 2, 0];
    expect(maxSumWindow(g, g.length, false)).toEqual({ first: GROWTH_GAP + 1, last: GROWTH_GAP + 1, sum: 2 });
  });

  it('wraps round a periodic line', () => {
    const g = [2, 0, 0, 0, 0, 0, 0, 1];
    expect(maxSumWindow(g, 8, true)).toEqual({ first: 7, last: 0, sum: 3 });
    expect(maxSumWindow(g, 8, false)).toEqual({ first: 0, last: 0, sum: 2 });
  });

  it('matches the brute-force maximum when no gap interrupts the data', () => {
    fc.assert(
      fc.property(
        fc.array(
          fc.integer({ min: -5, max: 5 }).filter((v) => v !== 0),
          { minLength: 1, maxLength: 40 },
        ),
        (g) => {
          const w = maxSumWindow(g, g.length, false, Infinity);
          const best = bruteBest(g);
          if (best <= 0) expect(w).toBeNull();
          else {
            expect(w!.sum).toBe(best);
            let s = 0;
            for (let i = w!.first; i <= w!.last; i++) s += g[i]!;
            expect(s).toBe(best);
          }
        },
      ),
    );
  });
});

describe('increase1d and increaseMarginals', () => {
  it('give |difference now| - |difference before| per edge, wrapping on periodic lines', () => {
    const now = Float64Array.from([0, 2, 2, 0]);
    const before = Float64Array.from([0, 1, 1, 0]);
    const out = new Float64Array(4);
    expect(increase1d(now, before, 4, true, out)).toBe(4);
    expect(Array.from(out)).toEqual([1, 0, 1, 0]);
    expect(increase1d(now, before, 4, false, out)).toBe(3);
  });

  it('give no edges for an empty line or a single cell', () => {
    const out = new Float64Array(1);
    expect(increase1d(new Float64Array(0), new Float64Array(0), 0, true, out)).toBe(0);
    expect(increase1d(Float64Array.from([2]), Float64Array.from([1]), 1, true, out)).toBe(0);
  });

  it('sum the increase of all axes per cell into every axis marginal', () => {
    const now = Float64Array.from([0, 1, 0, 3]); // 2x2, y slow
    const before = new Float64Array(4);
    const marginals = [new Float64Array(2), new Float64Array(2)];
    increaseMarginals(now, before, [2, 2], [2, 1], [false, false], marginals, new Int32Array(2));
    // Cell (0,0): |1-0| + |0-0| = 1; (0,1): |3-1| = 2; (1,0): |3-0| = 3; (1,1): none.
    expect(Array.from(marginals[0]!)).toEqual([3, 3]);
    expect(Array.from(marginals[1]!)).toEqual([4, 2]);
  });
});

describe('frontSide', () => {
  // A falling front at cells 9-10 with ripples on the low-index side (behind it for a flow
  // towards larger indices).
  const profile = Float64Array.from([1, 1, 1, 1.02, 0.97, 1.05, 0.94, 1.1, 1, 1, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0]);

  it('says upstream when the ripples trail the front for the given flow direction', () => {
    const side = frontSide(profile, 20, 0, 1, false, 0, 19, 1, 1e-12);
    expect(side.relation).toBe('upstream');
    expect(side.frontEdge).toBe(9);
  });

  it('says downstream for the same profile when the flow goes the other way', () => {
    expect(frontSide(profile, 20, 0, 1, false, 0, 19, -1, 1e-12).relation).toBe('downstream');
  });

  it('is undetermined for a clean monotone front and for a window without any difference', () => {
    const clean = Float64Array.from([1, 1, 1, 0.5, 0, 0, 0]);
    expect(frontSide(clean, 7, 0, 1, true, 0, 6, 1, 1e-12).relation).toBe('undetermined');
    const flat = new Float64Array(7);
    expect(frontSide(flat, 7, 0, 1, true, 0, 6, 1, 1e-12)).toMatchObject({ relation: 'undetermined', frontEdge: -1 });
  });

  it('is undetermined on a single cell', () => {
    expect(frontSide(Float64Array.from([1]), 1, 0, 1, true, 0, 0, 1, 0).relation).toBe('undetermined');
  });

  it('is undetermined on an empty line', () => {
    expect(frontSide(new Float64Array(0), 0, 0, 1, true, 0, 0, 1, 0)).toMatchObject({ frontEdge: -1 });
  });

  it('ignores NaN differences when looking for the steepest one', () => {
    const withNaN = Float64Array.from([1, 1, Number.NaN, 1, 0.5, 0, 0]);
    expect(frontSide(withNaN, 7, 0, 1, false, 0, 5, 1, 1e-12).frontEdge).toBe(3);
  });
});
