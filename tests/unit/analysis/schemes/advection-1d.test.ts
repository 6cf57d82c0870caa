import { describe, expect, it } from 'vitest';
import { runAdvection1d, SCHEME_NAMES, type SchemeName } from '@/src/analysis/schemes/advection-1d';
import { LIMITER_NAMES } from '@/src/analysis/schemes/limiters';
import { sineWave, topHat } from '@/src/analysis/schemes/profiles';
import { sumCompensated } from '@/src/analysis/summation';
import { expectUlps, U64 } from '../support';

const all: { scheme: SchemeName; limiter?: (typeof LIMITER_NAMES)[number] }[] = [
  ...SCHEME_NAMES.filter((s) => s !== 'limited').map((scheme) => ({ scheme })),
  ...LIMITER_NAMES.map((limiter) => ({ scheme: 'limited' as const, limiter })),
];

describe('runAdvection1d', () => {
  it.each(all)('$scheme $limiter keeps all-equal values unchanged', ({ scheme, limiter }) => {
    const out = runAdvection1d({
      initial: new Float64Array(12).fill(0.7),
      courant: 0.6,
      steps: 5,
      scheme,
      ...(limiter ? { limiter } : {}),
    });
    expect(Array.from(out[5]!)).toEqual(new Array(12).fill(0.7));
  });

  it('spreads a NaN only downstream, one stencil per step, without throwing', () => {
    const initial = new Float64Array(20);
    initial[5] = Number.NaN;
    const out = runAdvection1d({ initial, courant: 0.5, steps: 2, scheme: 'upwind' });
    expect(
      Array.from(out[2]!, Number.isNaN)
        .map((bad, i) => (bad ? i : -1))
        .filter((i) => i >= 0),
    ).toEqual([5, 6, 7]);
  });

  it('returns the initial state and one snapshot every `every` steps', () => {
    const out = runAdvection1d({ initial: topHat(10, 2, 3), courant: 0.5, steps: 7, scheme: 'upwind', every: 3 });
    expect(out).toHaveLength(3); // steps 0, 3, 6
    expect(Array.from(out[0]!)).toEqual(Array.from(topHat(10, 2, 3)));
  });

  it('does not modify the initial array', () => {
    const initial = topHat(10, 2, 3);
    runAdvection1d({ initial, courant: 0.5, steps: 5, scheme: 'lax-wendroff' });
    expect(Array.from(initial)).toEqual(Array.from(topHat(10, 2, 3)));
  });

  it('applies the first-order upwind update u_i - c (u_i - u_{i-1})', () => {
    const [, after] = runAdvection1d({
      initial: Float64Array.from([0, 1, 0, 0]),
      courant: 0.25,
      steps: 1,
      scheme: 'upwind',
    });
    expect(Array.from(after!)).toEqual([0, 0.75, 0.25, 0]);
  });

  it('applies the Lax-Wendroff update u_i - c/2 (u_{i+1} - u_{i-1}) + c^2/2 (u_{i+1} - 2u_i + u_{i-1})', () => {
    const u = [0, 1, 0, 0];
    const c = 0.5;
    const [, after] = runAdvection1d({ initial: Float64Array.from(u), courant: c, steps: 1, scheme: 'lax-wendroff' });
    const expected = u.map((ui, i) => {
      const l = u[(i + 3) % 4]!;
      const r = u[(i + 1) % 4]!;
      return ui - (c / 2) * (r - l) + ((c * c) / 2) * (r - 2 * ui + l);
    });
    // A few roundings of values no larger than 1.
    expected.forEach((v, i) => expectUlps(after![i], v, 8, 1));
  });

  it('applies the Warming-Beam update u_i - c/2 (3u_i - 4u_{i-1} + u_{i-2}) + c^2/2 (u_i - 2u_{i-1} + u_{i-2})', () => {
    const u = [0, 1, 0, 0, 0];
    const c = 0.5;
    const [, after] = runAdvection1d({ initial: Float64Array.from(u), courant: c, steps: 1, scheme: 'warming-beam' });
    const expected = u.map((ui, i) => {
      const l1 = u[(i + 4) % 5]!;
      const l2 = u[(i + 3) % 5]!;
      return ui - (c / 2) * (3 * ui - 4 * l1 + l2) + ((c * c) / 2) * (ui - 2 * l1 + l2);
    });
    expected.forEach((v, i) => expectUlps(after![i], v, 8, 1));
  });

  it.each(all)(
    '$scheme $limiter shifts the data by exactly one cell per step at Courant number 1',
    ({ scheme, limiter }) => {
      const initial = sineWave(16);
      const out = runAdvection1d({ initial, courant: 1, steps: 3, scheme, ...(limiter ? { limiter } : {}) });
      // Each step rounds u - (u - u_left) once or twice: a few ulps of the data's size per step.
      for (let i = 0; i < 16; i++) expectUlps(out[3]![(i + 3) % 16], initial[i]!, 3 * 8, 1);
    },
  );

  it.each(all)('$scheme $limiter conserves the sum of the cell values (flux form)', ({ scheme, limiter }) => {
    const initial = topHat(50, 10, 12, 0.2, 1.3);
    const out = runAdvection1d({ initial, courant: 0.37, steps: 60, scheme, ...(limiter ? { limiter } : {}) });
    const before = sumCompensated(initial);
    const after = sumCompensated(out[out.length - 1]!);
    expect(Math.abs(after - before)).toBeLessThanOrEqual(60 * 50 * 4 * U64 * before);
  });

  it.each(all)('$scheme $limiter with a negative Courant number mirrors the positive one', ({ scheme, limiter }) => {
    const initial = topHat(30, 5, 7);
    const forward = runAdvection1d({ initial, courant: 0.4, steps: 10, scheme, ...(limiter ? { limiter } : {}) });
    const mirrored = Float64Array.from(initial).reverse();
    const backward = runAdvection1d({
      initial: mirrored,
      courant: -0.4,
      steps: 10,
      scheme,
      ...(limiter ? { limiter } : {}),
    });
    const a = forward[10]!;
    const b = Float64Array.from(backward[10]!).reverse();
    // Mirrored runs round in a different order: a few ulps of the data's size per step.
    for (let i = 0; i < 30; i++) expectUlps(b[i], a[i]!, 10 * 16, 1);
  });

  it('needs a limiter for the limited scheme and rejects bad arguments', () => {
    const initial = topHat(10, 2, 3);
    expect(() => runAdvection1d({ initial, courant: 0.5, steps: 1, scheme: 'limited' })).toThrow(/limiter/);
    expect(() => runAdvection1d({ initial, courant: Number.NaN, steps: 1, scheme: 'upwind' })).toThrow(RangeError);
    expect(() => runAdvection1d({ initial, courant: 0.5, steps: -1, scheme: 'upwind' })).toThrow(RangeError);
    expect(() => runAdvection1d({ initial, courant: 0.5, steps: 1, scheme: 'upwind', every: 0 })).toThrow(RangeError);
  });

  it('handles empty and one-cell grids', () => {
    expect(
      runAdvection1d({ initial: new Float64Array(0), courant: 0.5, steps: 2, scheme: 'lax-wendroff' })[2]!.length,
    ).toBe(0);
    expect(
      Array.from(runAdvection1d({ initial: Float64Array.from([3]), courant: 0.5, steps: 2, scheme: 'upwind' })[2]!),
    ).toEqual([3]);
  });
});

describe('profiles', () => {
  it('topHat puts `high` on width cells from start, wrapping round the end', () => {
    expect(Array.from(topHat(6, 4, 3, 0, 2))).toEqual([2, 0, 0, 0, 2, 2]);
    expect(() => topHat(5, 0, 6)).toThrow(RangeError);
  });

  it('sineWave samples sin(2 pi p x) at cell centres (i + 1/2) / n', () => {
    const s = sineWave(8, 2);
    for (let i = 0; i < 8; i++) expect(s[i]).toBe(Math.sin(((2 * Math.PI * 2) / 8) * (i + 0.5)));
  });
});
