/**
 * Source: Harten 1983, "High resolution schemes for hyperbolic conservation laws", J. Comput.
 * Phys. 49: first-order upwind is TVD for Courant numbers in (0, 1], and flux-limited schemes whose
 * limiter lies in Sweby's region (Sweby 1984) are TVD for the same range. Limiters: van Leer 1974
 * and 1977, Roe 1985, van Albada, van Leer & Roberts 1982, Koren 1993.
 * The analyser must therefore report nothing for them, whether the snapshots are stored in
 * float64 or rounded to float32.
 */
import { describe, expect, it } from 'vitest';
import { runAdvection1d, type SchemeName } from '@/src/analysis/schemes/advection-1d';
import { LIMITER_NAMES, type LimiterName } from '@/src/analysis/schemes/limiters';
import { topHat } from '@/src/analysis/schemes/profiles';
import { totalVariation } from '@/src/analysis/total-variation';
import { analyse, line, toFloat32, U64 } from '../unit/analysis/support';

const schemes: { scheme: SchemeName; limiter?: LimiterName }[] = [
  { scheme: 'upwind' },
  ...LIMITER_NAMES.map((limiter) => ({ scheme: 'limited' as const, limiter })),
];
const courants = [0.05, 0.25, 0.5, 0.8, 1];

describe.each(schemes)('$scheme $limiter on a top hat (Harten 1983)', ({ scheme, limiter }) => {
  const runs = courants.map((courant) => ({
    courant,
    snapshots: runAdvection1d({
      initial: topHat(100, 30, 20),
      courant,
      steps: 150,
      scheme,
      ...(limiter ? { limiter } : {}),
    }),
  }));

  it.each(courants)('keeps TV non-increasing at Courant number %s', (courant) => {
    const { snapshots } = runs.find((r) => r.courant === courant)!;
    let previous = totalVariation(snapshots[0]!, undefined, { periodic: true });
    for (const s of snapshots.slice(1)) {
      const tv = totalVariation(s, undefined, { periodic: true });
      // The computed TVs carry a few ulps of rounding each.
      expect(tv).toBeLessThanOrEqual(previous * (1 + 8 * U64));
      previous = tv;
    }
  });

  it.each(courants)('gets no finding from the analyser in float64 at Courant number %s', (courant) => {
    const { snapshots } = runs.find((r) => r.courant === courant)!;
    const s = analyse(snapshots, line(100, true), { options: { velocitySign: 1 } });
    expect(s.findings).toEqual([]);
    expect(s.verdict).toBe('pass');
  });

  it.each(courants)('gets no finding from the analyser on float32 snapshots at Courant number %s', (courant) => {
    const { snapshots } = runs.find((r) => r.courant === courant)!;
    const s = analyse(toFloat32(snapshots), line(100, true), { precision: { kind: 'float32' } });
    expect(s.findings).toEqual([]);
  });
});
