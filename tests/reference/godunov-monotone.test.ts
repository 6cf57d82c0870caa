/**
 * Source: Godunov 1959, "A difference method for numerical calculation of discontinuous solutions
 * of the equations of hydrodynamics" (Mat. Sb. 47): a linear scheme that does not create new
 * extrema (a monotone scheme) is at most first-order accurate. Lax-Wendroff and Warming-Beam are
 * linear and second order, so they must create new extrema on a discontinuity; first-order upwind
 * is monotone for Courant numbers in (0, 1] and never does.
 */
import { describe, expect, it } from 'vitest';
import { runAdvection1d } from '@/src/analysis/schemes/advection-1d';
import { topHat } from '@/src/analysis/schemes/profiles';
import { analyse, line } from '../unit/analysis/support';

const courants = [0.1, 0.3, 0.5, 0.7, 0.9];

describe('new extrema on a top hat (Godunov 1959)', () => {
  it.each(courants)('Lax-Wendroff and Warming-Beam create new extrema at Courant number %s', (courant) => {
    for (const scheme of ['lax-wendroff', 'warming-beam'] as const) {
      const s = analyse(runAdvection1d({ initial: topHat(100, 40, 20), courant, steps: 80, scheme }), line(100, true));
      expect(s.metrics.maxNewExtrema).toBeGreaterThan(0);
      expect(s.findings.some((f) => f.kind === 'new-extrema' && f.severity === 'fail')).toBe(true);
    }
  });

  it.each(courants)('upwind never creates a new extremum at Courant number %s', (courant) => {
    const s = analyse(
      runAdvection1d({ initial: topHat(100, 40, 20), courant, steps: 300, scheme: 'upwind' }),
      line(100, true),
    );
    expect(s.series.newExtrema.every((k) => k === 0)).toBe(true);
  });
});
