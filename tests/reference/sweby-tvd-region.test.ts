/**
 * Source: Sweby 1984, "High resolution schemes using flux limiters for hyperbolic conservation
 * laws", SIAM J. Numer. Anal. 21(5). A flux-limited scheme is TVD for Courant numbers up to 1 when
 * 0 <= psi(r) <= min(2r, 2) for r > 0 and psi(r) = 0 for r <= 0; psi(1) = 1 makes it second order;
 * the second-order TVD region lies between minmod (below) and superbee (above).
 * Limiter formulas: van Leer 1974 and 1977, Roe 1985, van Albada, van Leer & Roberts 1982,
 * Koren 1993.
 */
import { describe, expect, it } from 'vitest';
import { LIMITER_NAMES, limiterFunction } from '@/src/analysis/schemes/limiters';
import { expectUlps } from '../unit/analysis/support';

/** Dense samples of r > 0: uniform on (0, 4], logarithmic from 1e-12 to 1e12, and extremes. */
function positiveSamples(): number[] {
  const r: number[] = [];
  for (let k = 1; k <= 40_000; k++) r.push(k / 10_000);
  for (let e = -12; e <= 12; e += 0.001) r.push(10 ** e);
  r.push(Number.MIN_VALUE, 1e-300, 1e300, Number.MAX_VALUE, Infinity);
  return r;
}

const minmod = (r: number): number => Math.max(0, Math.min(1, r));
const superbee = (r: number): number => Math.max(0, Math.min(2 * r, 1), Math.min(r, 2));

describe.each(LIMITER_NAMES)('limiter %s (Sweby 1984)', (name) => {
  const psi = limiterFunction(name);

  it('lies in the TVD region 0 <= psi(r) <= min(2r, 2) for r > 0', () => {
    for (const r of positiveSamples()) {
      const value = psi(r);
      expect(value).toBeGreaterThanOrEqual(0);
      expect(value).toBeLessThanOrEqual(Math.min(2 * r, 2));
    }
  });

  it('is zero for r <= 0 (and for the 0/0 ratio of a plateau)', () => {
    for (const r of [0, -0, -1e-300, -0.5, -1, -2, -1e6, -Infinity, Number.NaN]) expect(psi(r)).toBe(0);
  });

  it('has psi(1) = 1', () => {
    expect(psi(1)).toBe(1);
  });

  it('lies between minmod and superbee (the second-order TVD region)', () => {
    for (const r of positiveSamples()) {
      const value = psi(r);
      // One ulp of slack for the rational limiters (van Leer, van Albada), evaluated in floating point.
      expect(value).toBeGreaterThanOrEqual(minmod(r) * (1 - 2 ** -52));
      expect(value).toBeLessThanOrEqual(superbee(r) * (1 + 2 ** -52));
    }
  });
});

describe('limiter formulas at published sample points', () => {
  it('superbee follows the upper boundary of the region for r <= 1/2 and r >= 2 (Roe 1985)', () => {
    const psi = limiterFunction('superbee');
    expect(psi(0.25)).toBe(0.5);
    expect(psi(1.5)).toBe(1.5);
    expect(psi(5)).toBe(2);
  });

  it('van Leer is (r + |r|) / (1 + |r|) (van Leer 1974)', () => {
    const psi = limiterFunction('van-leer');
    expect(psi(3)).toBe(1.5);
    expect(psi(Infinity)).toBe(2);
  });

  it('monotonized central is min(2r, (1 + r)/2, 2) (van Leer 1977)', () => {
    const psi = limiterFunction('monotonized-central');
    expect(psi(0.2)).toBe(0.4);
    expect(psi(2)).toBe(1.5);
    expect(psi(4)).toBe(2);
  });

  it('van Albada is (r^2 + r) / (r^2 + 1) (van Albada, van Leer & Roberts 1982)', () => {
    const psi = limiterFunction('van-albada');
    expectUlps(psi(2), 6 / 5, 4);
    expectUlps(psi(0.5), 0.75 / 1.25, 4);
  });

  it('Koren is min(2r, (1 + 2r)/3, 2) (Koren 1993)', () => {
    const psi = limiterFunction('koren');
    expectUlps(psi(0.1), 0.2, 4);
    expectUlps(psi(2), 5 / 3, 4);
    expect(psi(3)).toBe(2);
  });

  it('minmod is max(0, min(1, r)) (Roe 1985)', () => {
    const psi = limiterFunction('minmod');
    expect(psi(0.3)).toBe(0.3);
    expect(psi(7)).toBe(1);
  });
});
