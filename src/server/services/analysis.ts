import 'server-only';
import { ZodError } from 'zod';
import {
  createAnalyser,
  judge,
  type Analyser,
  type Finding as AnalysisFinding,
  type Policy,
  type VariableSummary,
} from '@/src/analysis';
import { parsePolicy } from '@/src/analysis/policy';
import type { Precision } from '@/src/analysis/types';
import { isReadError, type SnapshotReader } from '@/src/ingest';
import { mergeDeep } from '@/src/lib/merge';
import type { Variable } from '@/db/schema';
import { getBaseline } from '../queries/projects';
import { listRunVariables, type AnalysisResultRows } from '../queries/runs';

/**
 * Turning a snapshot file into stored results: every variable of the file through its own
 * streaming analyser, then one judgement with the effective policy and the baseline.
 */

/** A problem with the input or its configuration: the run ends in `error`, without retries. */
export class InputError extends Error {
  override readonly name = 'InputError';
}

/** defaults < project's default policy < case's policy. A stored policy that no longer parses is the maintainer's to fix. */
export function effectivePolicy(projectPolicy: unknown, casePolicy: unknown): Policy {
  try {
    return parsePolicy(mergeDeep(projectPolicy, casePolicy));
  } catch (err) {
    if (err instanceof ZodError) {
      const first = err.issues[0];
      throw new InputError(
        `The case's policy is invalid (${first ? `${first.path.join('.')}: ${first.message}` : 'unknown field'}); fix it on the policy page.`,
      );
    }
    throw err;
  }
}

export interface AnalyseOptions {
  policy: Policy;
  /** Pause after each step; only for failure tests (VARIGATE_ANALYSIS_STEP_DELAY_MS). */
  stepDelayMs?: number;
}

/** Streams every step of the file through one analyser per variable; returns their summaries. */
export async function analyseSnapshots(reader: SnapshotReader, options: AnalyseOptions): Promise<VariableSummary[]> {
  const { header } = reader;
  const analysers: Analyser[] = header.variables.map((v) =>
    createAnalyser(
      { name: v.name, grid: header.grid, precision: v.precision, options: v.options },
      { policy: options.policy },
    ),
  );
  let steps = 0;
  for await (const step of reader.steps) {
    for (const analyser of analysers) {
      const values = step.fields[analyser.variable];
      if (!values) throw new InputError(`Step ${step.index} has no values for variable "${analyser.variable}".`);
      try {
        analyser.push({ index: step.index, time: step.time, values }, step.significantDigits?.[analyser.variable]);
      } catch (err) {
        // The analyser's own checks (cell count, increasing step numbers) are input problems.
        if (err instanceof RangeError)
          throw new InputError(`Step ${step.index}, variable "${analyser.variable}": ${err.message}`);
        throw err;
      }
    }
    steps++;
    if (options.stepDelayMs) await new Promise((r) => setTimeout(r, options.stepDelayMs));
  }
  if (steps === 0) throw new InputError('The file holds no steps.');
  return analysers.map((a) => a.finish());
}

export function isInputError(err: unknown): boolean {
  return err instanceof InputError || isReadError(err);
}

export function precisionLabel(p: Precision): string {
  return p.kind === 'decimal' ? `decimal(${p.significantDigits})` : p.kind;
}

/** What is stored of a summary: everything but the series (kept in their own column) and the analyser's provisional judgement. */
export function toVariableRow(s: VariableSummary) {
  const { series, findings: _findings, verdict: _verdict, ...summary } = s;
  return { name: s.variable, shape: s.shape, precision: precisionLabel(s.precision), summary, series };
}

/** Rebuilds an analyser summary from a stored variable row, for re-judging and baselines. */
export function fromVariableRow(v: Pick<Variable, 'summary' | 'series'>): VariableSummary {
  return {
    ...(v.summary as Omit<VariableSummary, 'series' | 'findings' | 'verdict'>),
    series: v.series,
    findings: [],
    verdict: 'pass',
  } as VariableSummary;
}

export function toFindingRow(f: AnalysisFinding) {
  return {
    variable: f.variable,
    kind: f.kind,
    severity: f.severity,
    step: f.step,
    time: f.time,
    location: f.location,
    magnitude: Number.isFinite(f.magnitude) ? f.magnitude : null,
    threshold: Number.isFinite(f.threshold) ? f.threshold : null,
    details: {
      relative: f.relative,
      steps: f.steps,
      worst: f.worst,
      metric: f.metric ?? null,
      baseline: f.baseline ?? null,
    },
    message: f.message,
  };
}

/** Judges summaries and shapes the rows that replace a run's results. */
export function judgeToRows(
  summaries: VariableSummary[],
  policy: Policy,
  baseline: VariableSummary[] | null,
): AnalysisResultRows {
  const judgement = judge(summaries, policy, baseline);
  return {
    variables: summaries.map(toVariableRow),
    findings: judgement.findings.map(toFindingRow),
    verdict: judgement.verdict,
    policy,
  };
}

export function errorRows(message: string, policy: unknown): AnalysisResultRows {
  return { variables: [], findings: [], verdict: 'error', policy, errorMessage: message };
}

/**
 * The accepted run's summaries for a run on `branch`: the case's baseline on that branch, else on
 * the project's default branch; none when the run is itself the baseline or has no metrics.
 */
export async function loadBaselineSummaries(input: {
  workspaceId: string;
  caseId: string;
  runId: string;
  branch: string;
  defaultBranch: string;
}): Promise<{ runId: string; summaries: VariableSummary[] } | null> {
  const { workspaceId, caseId } = input;
  const baseline =
    (await getBaseline({ workspaceId, caseId, branch: input.branch })) ??
    (await getBaseline({ workspaceId, caseId, branch: input.defaultBranch }));
  if (!baseline || baseline.runId === input.runId) return null;
  const rows = await listRunVariables({ workspaceId, runId: baseline.runId });
  return rows.length > 0 ? { runId: baseline.runId, summaries: rows.map(fromVariableRow) } : null;
}
