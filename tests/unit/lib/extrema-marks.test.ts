import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { countExtremaStrided } from '@/src/analysis/extrema';
import { lineExtrema, unmatchedExtrema } from '@/src/lib/extrema-marks';

describe('lineExtrema', () => {
  it('finds peaks and troughs and reports a plateau once, at its middle', () => {
    expect(lineExtrema([0, 1, 0, -1, 0])).toEqual([
      { cell: 1, kind: 'max' },
      { cell: 3, kind: 'min' },
    ]);
    expect(lineExtrema([0, 2, 2, 2, 0])).toEqual([{ cell: 2, kind: 'max' }]);
  });

  it('never counts the ends of a non-periodic line, but closes the cycle of a periodic one', () => {
    expect(lineExtrema([3, 2, 1])).toEqual([]);
    expect(lineExtrema([0, 1, 2, 1], 0, true)).toEqual([
      { cell: 0, kind: 'min' },
      { cell: 2, kind: 'max' },
    ]);
  });

  it('ignores wiggles within the noise floor', () => {
    expect(lineExtrema([0, 1e-17, 0, 1, 0], 1e-16)).toEqual([{ cell: 3, kind: 'max' }]);
  });

  it('gives nothing for empty, single-cell and all-equal lines', () => {
    expect(lineExtrema([])).toEqual([]);
    expect(lineExtrema([5])).toEqual([]);
    expect(lineExtrema([2, 2, 2], 0, true)).toEqual([]);
  });

  it('finds exactly as many extrema as the analyser counts, on random lines', () => {
    fc.assert(
      fc.property(
        fc.array(fc.integer({ min: -3, max: 3 }), { minLength: 0, maxLength: 60 }),
        fc.boolean(),
        fc.constantFrom(0, 1),
        (v, periodic, floor) => {
          expect(lineExtrema(v, floor, periodic)).toHaveLength(countExtremaStrided(v.length, v, 1, 0, periodic, floor));
        },
      ),
    );
  });
});

describe('unmatchedExtrema', () => {
  const previous = [
    { cell: 10, kind: 'max' as const },
    { cell: 20, kind: 'min' as const },
  ];

  it('does not mark extrema that moved by at most `reach` cells', () => {
    expect(
      unmatchedExtrema(
        [
          { cell: 12, kind: 'max' },
          { cell: 21, kind: 'min' },
        ],
        previous,
        2,
        100,
      ),
    ).toEqual([]);
  });

  it('marks an extremum with no same-kind neighbour nearby as new', () => {
    const current = [
      { cell: 11, kind: 'min' as const },
      { cell: 14, kind: 'max' as const },
      { cell: 40, kind: 'max' as const },
    ];
    expect(unmatchedExtrema(current, previous, 2, 100)).toEqual(current);
  });

  it('measures distance the short way round a periodic line', () => {
    const prev = [{ cell: 99, kind: 'max' as const }];
    expect(unmatchedExtrema([{ cell: 1, kind: 'max' }], prev, 2, 100, true)).toEqual([]);
    expect(unmatchedExtrema([{ cell: 1, kind: 'max' }], prev, 2, 100, false)).toHaveLength(1);
  });
});
