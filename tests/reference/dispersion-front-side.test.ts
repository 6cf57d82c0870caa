/**
 * Source: common practice, stated in LeVeque 2002, "Finite Volume Methods for Hyperbolic
 * Problems", section 8.6 (and Warming & Beam 1976): on a discontinuity, Lax-Wendroff's dispersive
 * ripples trail the front (upstream, behind it) and Warming-Beam's lead it (downstream, ahead of
 * it); both raise the total variation. Case: a top hat of 20 cells on 100 cells at Courant 0.2.
 */
import { describe, expect, it } from 'vitest';
import { runAdvection1d } from '@/src/analysis/schemes/advection-1d';
import { topHat } from '@/src/analysis/schemes/profiles';
import { totalVariation } from '@/src/analysis/total-variation';
import { analyse, line } from '../unit/analysis/support';

const cases = [
  { scheme: 'lax-wendroff' as const, side: 'upstream' },
  { scheme: 'warming-beam' as const, side: 'downstream' },
];

describe.each(cases)('$scheme on a top hat at Courant 0.2', ({ scheme, side }) => {
  for (const direction of [1, -1] as const) {
    const snapshots = runAdvection1d({ initial: topHat(100, 40, 20), courant: 0.2 * direction, steps: 100, scheme });
    const s = analyse(snapshots, line(100, true), { options: { velocitySign: direction } });

    it(`raises the total variation (velocity sign ${direction})`, () => {
      const tv0 = totalVariation(snapshots[0]!, undefined, { periodic: true });
      const tv1 = totalVariation(snapshots[1]!, undefined, { periodic: true });
      expect(tv1).toBeGreaterThan(tv0);
      expect(s.metrics.maxTvGrowth).toBeGreaterThan(0);
    });

    it(`is flagged by the analyser with the oscillation ${side} of the front (velocity sign ${direction})`, () => {
      const finding = s.findings.find((f) => f.kind === 'tv-growth')!;
      expect(finding.severity).toBe('fail');
      expect(finding.location?.front?.relation).toBe(side);
      expect(finding.message).toContain(`${side} of the front`);
    });

    it(`places most growth steps ${side} of the front (velocity sign ${direction})`, () => {
      const sides = s.growth.map((g) => g.front?.relation);
      const agree = sides.filter((r) => r === side).length;
      expect(agree).toBeGreaterThan(0.9 * sides.length);
    });
  }
});
