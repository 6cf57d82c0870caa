/**
 * What the run page opens on: the variable, step and cell range a person most likely came for.
 * A link can name them (`?variable=u&step=140`); otherwise the page opens on the worst finding
 * (findings arrive worst first), else on the first step of the first variable.
 */
import { cellWindow, indexOfSorted, type CellWindow } from './chart-math';
import type { CellRangeView, FindingView, VariableView } from './run-views';

export interface RunSelection {
  variable: string;
  /** Position of the step in the variable's step list (not the step number). */
  position: number;
  /** The finding whose place is shown, if any. */
  findingId: string | null;
}

function firstParam(v: string | string[] | undefined): string | undefined {
  return Array.isArray(v) ? v[0] : v;
}

/** The selection a page load starts with; null when the run has no analysed variables. */
export function initialSelection(
  variables: readonly Pick<VariableView, 'name' | 'steps'>[],
  findings: readonly Pick<FindingView, 'id' | 'variable' | 'step'>[],
  params: { variable?: string | string[]; step?: string | string[] } = {},
): RunSelection | null {
  if (variables.length === 0) return null;
  const named = firstParam(params.variable);
  const stepText = firstParam(params.step);
  const asked = variables.find((v) => v.name === named);
  if (asked || stepText !== undefined) {
    const variable = asked ?? variables[0]!;
    const position =
      stepText !== undefined && /^\d+$/.test(stepText) ? indexOfSorted(variable.steps, Number(stepText)) : -1;
    return { variable: variable.name, position: Math.max(0, position), findingId: null };
  }
  for (const f of findings) {
    const variable = variables.find((v) => v.name === f.variable);
    if (!variable || f.step === null) continue;
    const position = indexOfSorted(variable.steps, f.step);
    if (position >= 0) return { variable: variable.name, position, findingId: f.id };
  }
  return { variable: variables[0]!.name, position: 0, findingId: null };
}

/**
 * The range along the fastest axis of a finding's location (the axis a 1D chart shows), or
 * null when the finding has no location.
 */
export function fastestRange(ranges: readonly CellRangeView[] | undefined): CellRangeView | null {
  return ranges && ranges.length > 0 ? ranges[ranges.length - 1]! : null;
}

/** The cells a 1D field chart zooms to for a finding, or null for the whole line. */
export function findingWindow(finding: Pick<FindingView, 'location'>, size: number): CellWindow | null {
  const range = fastestRange(finding.location?.ranges);
  if (!range) return null;
  const window = cellWindow(range.first, range.last, size);
  return window.from === 0 && window.to === size - 1 ? null : window;
}
