/** Number and location formatting for the one-line finding messages. */
import type { CellRange, FrontSummary } from './summary';

/**
 * Two significant digits in exponent form ("3.2e-2"), "0" for zero.
 *
 * References: none (message formatting of Varigate).
 */
export function formatMagnitude(x: number): string {
  if (x === 0) return '0';
  return x.toExponential(1);
}

/**
 * A fraction as a percentage with two significant digits ("1.6 %").
 *
 * References: none (message formatting of Varigate).
 */
export function formatPercent(fraction: number): string {
  const p = fraction * 100;
  if (p === 0) return '0 %';
  const text = Math.abs(p) >= 0.01 ? String(Number(p.toPrecision(2))) : p.toExponential(1);
  return `${text} %`;
}

/**
 * A data value with up to six significant digits and no trailing zeros ("1.0032").
 *
 * References: none (message formatting of Varigate).
 */
export function formatValue(x: number): string {
  return String(Number(x.toPrecision(6)));
}

/**
 * "cells 41-47", "cell 45", or for several axes "cells y 3-9, x 41-47".
 *
 * References: none (message formatting of Varigate).
 */
export function formatRanges(ranges: readonly CellRange[]): string {
  if (ranges.length === 0) return '';
  const part = (r: CellRange): string => (r.first === r.last ? `${r.first}` : `${r.first}-${r.last}`);
  const single = ranges.every((r) => r.first === r.last);
  if (ranges.length === 1) return `${single ? 'cell' : 'cells'} ${part(ranges[0]!)}`;
  return `${single ? 'cell' : 'cells'} ${ranges.map((r) => `${r.axis} ${part(r)}`).join(', ')}`;
}

/**
 * "upstream of the front", "downstream of the front", or '' when undetermined or absent.
 *
 * References: none (message formatting of Varigate).
 */
export function formatFront(front: FrontSummary | undefined): string {
  if (front === undefined || front.relation === 'undetermined') return '';
  return `${front.relation} of the front`;
}

/**
 * "step 140" or "step 140 (t = 0.35)".
 *
 * References: none (message formatting of Varigate).
 */
export function formatStep(step: number, time: number | null): string {
  return time === null ? `step ${step}` : `step ${step} (t = ${formatValue(time)})`;
}
