import { describe, expect, it } from 'vitest';
import { fastestRange, findingWindow, initialSelection } from '@/src/lib/run-selection';

const variables = [
  { name: 'rho', steps: [0, 10, 20, 30] },
  { name: 'u', steps: [0, 10, 20, 30] },
];
const range = (first: number, last: number, axis = 'x') => ({
  axis,
  first,
  last,
  firstCoordinate: first,
  lastCoordinate: last,
});

describe('initialSelection', () => {
  it('opens on the worst finding (the first listed) that has a step', () => {
    const findings = [
      { id: 'a', variable: 'u', step: null },
      { id: 'b', variable: 'u', step: 20 },
      { id: 'c', variable: 'rho', step: 10 },
    ];
    expect(initialSelection(variables, findings)).toEqual({ variable: 'u', position: 2, findingId: 'b' });
  });

  it('follows ?variable= and ?step= from a shared link over the findings', () => {
    const findings = [{ id: 'b', variable: 'u', step: 20 }];
    expect(initialSelection(variables, findings, { variable: 'rho', step: '30' })).toEqual({
      variable: 'rho',
      position: 3,
      findingId: null,
    });
  });

  it('falls back to the first step for a step number the variable does not have, and to the first variable for an unknown name', () => {
    expect(initialSelection(variables, [], { variable: 'nope', step: '15' })).toEqual({
      variable: 'rho',
      position: 0,
      findingId: null,
    });
    expect(initialSelection(variables, [], { step: 'x' })).toEqual({ variable: 'rho', position: 0, findingId: null });
  });

  it('opens on the first step of the first variable when nothing was found, and gives null without variables', () => {
    expect(initialSelection(variables, [])).toEqual({ variable: 'rho', position: 0, findingId: null });
    expect(initialSelection([], [{ id: 'a', variable: 'u', step: 1 }])).toBeNull();
  });
});

describe('fastestRange and findingWindow', () => {
  it('takes the last (fastest) axis of a multi-axis location', () => {
    expect(fastestRange([range(1, 2, 'y'), range(5, 9, 'x')])?.axis).toBe('x');
    expect(fastestRange([])).toBeNull();
  });

  it('zooms a 1D chart to the finding range with margins, or not at all without a location', () => {
    expect(findingWindow({ location: { ranges: [range(40, 50)] } }, 100)).toEqual({ from: 35, to: 55 });
    expect(findingWindow({ location: null }, 100)).toBeNull();
  });

  it('does not zoom when the window would be the whole line anyway', () => {
    expect(findingWindow({ location: { ranges: [range(90, 5)] } }, 100)).toBeNull();
    expect(findingWindow({ location: { ranges: [range(2, 8)] } }, 12)).toBeNull();
  });
});
