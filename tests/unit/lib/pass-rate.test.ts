import { describe, expect, it } from 'vitest';
import { fillDays, trailingPassRate } from '@/src/lib/pass-rate';

describe('pass-rate trend', () => {
  it('fills the days without builds between two dates', () => {
    const days = fillDays([{ day: '2026-11-02', builds: 2, passed: 1 }], '2026-11-01', '2026-11-03');
    expect(days).toEqual([
      { day: '2026-11-01', builds: 0, passed: 0 },
      { day: '2026-11-02', builds: 2, passed: 1 },
      { day: '2026-11-03', builds: 0, passed: 0 },
    ]);
  });

  it('computes the pass rate over a trailing window and forgets days that left it', () => {
    const days = [
      { day: 'a', builds: 1, passed: 1 },
      { day: 'b', builds: 1, passed: 0 },
      { day: 'c', builds: 2, passed: 0 },
      { day: 'd', builds: 0, passed: 0 },
    ];
    const rates = trailingPassRate(days, 2).map((p) => p.rate);
    // a: 1/1; b: (1+0)/2; c: (0+0)/3; d: (0+0)/2 — day a and b left the window.
    expect(rates).toEqual([1, 0.5, 0, 0]);
  });

  it('has no rate while the window holds no build', () => {
    expect(trailingPassRate([{ day: 'a', builds: 0, passed: 0 }], 7)[0]!.rate).toBeNull();
  });
});
