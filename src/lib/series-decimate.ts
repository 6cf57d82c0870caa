/**
 * Thinning a per-step metric series (5,000 steps and more) to what a chart can draw, on the
 * server. Several metrics share one set of kept steps, so that every curve of the chart is drawn
 * at the same steps and the tooltip can read all of them at once.
 */

type Column = ArrayLike<number | null>;

/**
 * Positions (0-based, increasing, no repeats) to keep from `count` steps. With at most `maxPoints`
 * steps everything is kept. Otherwise the steps are cut into equal buckets and each bucket keeps,
 * for every column, the step of its smallest and of its largest value, so that a spike in any
 * metric survives (min/max decimation, applied per column). The bucket count is chosen so that at
 * most `maxPoints` positions come out of the buckets; the first and last step and every position
 * in `mustKeep` (steps with findings) are added on top.
 */
export function keepPositions(
  count: number,
  columns: readonly Column[],
  maxPoints: number,
  mustKeep: readonly number[] = [],
): number[] {
  if (count <= 0) return [];
  if (count <= maxPoints) return Array.from({ length: count }, (_, i) => i);
  const perBucket = Math.max(1, 2 * columns.length);
  const buckets = Math.max(1, Math.floor(maxPoints / perBucket));
  const kept = new Set<number>([0, count - 1]);
  for (const p of mustKeep) if (Number.isInteger(p) && p >= 0 && p < count) kept.add(p);
  for (let b = 0; b < buckets; b++) {
    const start = Math.floor((b * count) / buckets);
    const end = Math.floor(((b + 1) * count) / buckets);
    if (end <= start) continue;
    for (const column of columns) addBucketExtremes(column, start, end, kept);
  }
  return [...kept].sort((a, b) => a - b);
}

/** Adds the positions of the smallest and largest finite value of column[start, end). */
function addBucketExtremes(column: Column, start: number, end: number, kept: Set<number>): void {
  let lo = -1;
  let hi = -1;
  for (let i = start; i < end; i++) {
    const v = column[i];
    if (v === null || v === undefined || !Number.isFinite(v)) continue;
    if (lo < 0 || v < column[lo]!) lo = i;
    if (hi < 0 || v > column[hi]!) hi = i;
  }
  // A bucket with no finite value still needs one point, or the curve would jump over it.
  if (lo < 0) kept.add(start);
  else {
    kept.add(lo);
    kept.add(hi);
  }
}

/** values[p] for each kept position; missing or non-finite entries become null (JSON has no NaN). */
export function pickAt(values: ArrayLike<number | null> | undefined, positions: readonly number[]): (number | null)[] {
  return positions.map((p) => {
    const v = values?.[p];
    return v === null || v === undefined || !Number.isFinite(v) ? null : v;
  });
}
