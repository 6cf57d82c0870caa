/**
 * Source: LeVeque 2002, "Finite Volume Methods for Hyperbolic Problems", sections 6.1 and 8.1:
 * Lax-Wendroff is second-order accurate on smooth solutions, first-order upwind first order. After
 * one period of periodic advection the exact solution is the initial sine, so the cell-size
 * weighted error norms of errorNorms must fall by ~4x per halving of the cell size for
 * Lax-Wendroff and ~2x for upwind.
 */
import { describe, expect, it } from 'vitest';
import { errorNorms, observedOrder } from '@/src/analysis/error-norms';
import { runAdvection1d, type SchemeName } from '@/src/analysis/schemes/advection-1d';
import { sineWave } from '@/src/analysis/schemes/profiles';
import { line } from '../unit/analysis/support';

const courant = 0.5;
const sizes = [64, 128, 256, 512];

function errorsAfterOnePeriod(scheme: SchemeName) {
  return sizes.map((cells) => {
    const initial = sineWave(cells);
    const steps = cells / courant; // one period: the wave travels `cells` cells
    const out = runAdvection1d({ initial, courant, steps, scheme, every: steps });
    return errorNorms(out[1]!, initial, { grid: line(cells, true, 1 / cells) });
  });
}

describe('observed order of accuracy after one period of a sine', () => {
  const lw = errorsAfterOnePeriod('lax-wendroff');
  const upwind = errorsAfterOnePeriod('upwind');

  it.each(['l1', 'l2', 'max'] as const)('Lax-Wendroff converges at second order in the %s norm', (norm) => {
    for (let k = 1; k < sizes.length; k++) {
      const p = observedOrder(lw[k - 1]![norm], lw[k]![norm]);
      expect(p).toBeGreaterThan(1.85);
      expect(p).toBeLessThan(2.15);
    }
  });

  it.each(['l1', 'l2', 'max'] as const)('first-order upwind converges at first order in the %s norm', (norm) => {
    const p = observedOrder(upwind[sizes.length - 2]![norm], upwind[sizes.length - 1]![norm]);
    expect(p).toBeGreaterThan(0.85);
    expect(p).toBeLessThan(1.15);
  });
});
