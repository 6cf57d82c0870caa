import { describe, expect, it } from 'vitest';
import { runAdvection1d } from '@/src/analysis/schemes/advection-1d';
import { runAdvection2dSplit } from '@/src/analysis/schemes/advection-2d';
import { topHat } from '@/src/analysis/schemes/profiles';
import { sumCompensated } from '@/src/analysis/summation';
import { U64 } from '../support';

describe('runAdvection2dSplit', () => {
  it('reduces to the 1D scheme on every row when the y Courant number is 0', () => {
    const nx = 20;
    const ny = 3;
    const row = topHat(nx, 4, 5);
    const initial = new Float64Array(nx * ny);
    for (let j = 0; j < ny; j++) initial.set(row, j * nx);
    const two = runAdvection2dSplit({
      initial,
      nx,
      ny,
      courantX: 0.3,
      courantY: 0,
      steps: 6,
      scheme: 'limited',
      limiter: 'van-leer',
    });
    const one = runAdvection1d({ initial: row, courant: 0.3, steps: 6, scheme: 'limited', limiter: 'van-leer' });
    for (let j = 0; j < ny; j++) {
      expect(Array.from(two[6]!.subarray(j * nx, (j + 1) * nx))).toEqual(Array.from(one[6]!));
    }
  });

  it('advects along y (the slow axis) when the x Courant number is 0', () => {
    const nx = 2;
    const ny = 12;
    const column = topHat(ny, 3, 4);
    const initial = new Float64Array(nx * ny);
    for (let j = 0; j < ny; j++) initial.fill(column[j]!, j * nx, (j + 1) * nx);
    const two = runAdvection2dSplit({ initial, nx, ny, courantX: 0, courantY: 1, steps: 2, scheme: 'upwind' });
    for (let j = 0; j < ny; j++) expect(two[2]![((j + 2) % ny) * nx]).toBe(column[j]);
  });

  it('conserves the total sum', () => {
    const nx = 16;
    const ny = 16;
    const initial = Float64Array.from({ length: nx * ny }, (_, i) =>
      ((i % nx) - 5) ** 2 < 9 && (Math.floor(i / nx) - 8) ** 2 < 9 ? 1 : 0.1,
    );
    const out = runAdvection2dSplit({
      initial,
      nx,
      ny,
      courantX: 0.4,
      courantY: 0.3,
      steps: 20,
      scheme: 'lax-wendroff',
      every: 10,
    });
    expect(out).toHaveLength(3);
    const before = sumCompensated(initial);
    expect(Math.abs(sumCompensated(out[2]!) - before)).toBeLessThanOrEqual(20 * 256 * 8 * U64 * before);
  });

  it('rejects an initial array of the wrong size', () => {
    expect(() =>
      runAdvection2dSplit({
        initial: new Float64Array(5),
        nx: 2,
        ny: 2,
        courantX: 0.5,
        courantY: 0.5,
        steps: 1,
        scheme: 'upwind',
      }),
    ).toThrow(RangeError);
  });
});
