/**
 * Where the extrema of a 1D profile are, for marking them on the field chart. The analyser only
 * counts extrema (src/analysis/extrema.ts); the chart needs positions. The rule is the analyser's:
 * differences of at most `floor` count as zero, a plateau counts once, the ends of a non-periodic
 * line never count, a periodic line is cyclic; so `lineExtrema(...).length` equals its count.
 *
 * Which of them are "new" is a heuristic of ours, for the picture only (the verdict comes from the
 * counts): an extremum is new when the previous step has no extremum of the same kind within
 * `reach` cells. Extrema that merely moved with the flow by up to `reach` cells are not marked.
 */

export type ExtremumKind = 'max' | 'min';

export interface ExtremumMark {
  /** The middle cell of the extremal plateau. */
  cell: number;
  kind: ExtremumKind;
}

/** Middle cell of the plateau between the edges `afterEdge` and `beforeEdge` on a line of n cells. */
function plateauMiddle(afterEdge: number, beforeEdge: number, n: number): number {
  // Edge e joins cells e and e + 1, so the plateau runs from cell afterEdge + 1 to cell beforeEdge.
  const first = afterEdge + 1;
  const last = beforeEdge >= first ? beforeEdge : beforeEdge + n;
  return Math.floor((first + last) / 2) % n;
}

/** Strict local extrema of a line (rules: file comment), in increasing cell order. */
export function lineExtrema(values: ArrayLike<number>, floor = 0, periodic = false): ExtremumMark[] {
  const n = values.length;
  if (n < 2) return [];
  const marks: ExtremumMark[] = [];
  const edges = periodic ? n : n - 1;
  let firstSign = 0;
  let firstEdge = -1;
  let lastSign = 0;
  let lastEdge = -1;
  for (let e = 0; e < edges; e++) {
    const j = e === n - 1 ? 0 : e + 1;
    const d = values[j]! - values[e]!;
    const sign = d > floor ? 1 : d < -floor ? -1 : 0;
    if (sign === 0) continue;
    if (lastSign !== 0 && sign !== lastSign) {
      marks.push({ cell: plateauMiddle(lastEdge, e, n), kind: lastSign > 0 ? 'max' : 'min' });
    }
    if (firstSign === 0) {
      firstSign = sign;
      firstEdge = e;
    }
    lastSign = sign;
    lastEdge = e;
  }
  // Closing the cycle: the plateau between the last significant edge and the first one.
  if (periodic && firstSign !== 0 && lastSign !== firstSign) {
    marks.push({ cell: plateauMiddle(lastEdge, firstEdge, n), kind: lastSign > 0 ? 'max' : 'min' });
  }
  return marks.sort((a, b) => a.cell - b.cell);
}

/** Distance between two cells of a line, the short way round when it is periodic. */
function cellDistance(a: number, b: number, n: number, periodic: boolean): number {
  const d = Math.abs(a - b);
  return periodic ? Math.min(d, n - d) : d;
}

/**
 * The extrema of `current` with no extremum of the same kind within `reach` cells in `previous`
 * (both from `lineExtrema` of a line of `n` cells).
 */
export function unmatchedExtrema(
  current: readonly ExtremumMark[],
  previous: readonly ExtremumMark[],
  reach: number,
  n: number,
  periodic = false,
): ExtremumMark[] {
  const byKind: Record<ExtremumKind, number[]> = { max: [], min: [] };
  for (const m of previous) byKind[m.kind].push(m.cell);
  return current.filter((m) => !byKind[m.kind].some((cell) => cellDistance(cell, m.cell, n, periodic) <= reach));
}
