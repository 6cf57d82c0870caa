/**
 * What a weekly digest says about one project, computed from plain rows (no I/O): pass rate and
 * its change, cases that started failing, cases fixed, cases still failing and the longest
 * failing one. The queries in src/server/queries/digests.ts produce the rows; the mail template
 * only formats the result.
 *
 * Rules (docs/notifications.md says the same):
 * - Only runs on the project's default branch count, one per case and build (the latest run of
 *   the case in that build, so a CI retry supersedes the earlier attempt).
 * - Pass rate = runs with verdict pass or warn (the gate lets them through) / runs with any
 *   verdict, `error` included (an unreadable upload is not a passing case).
 * - Failing = verdict fail. A run in `error` says nothing about the numerics: it neither starts
 *   nor ends a failing streak.
 * - A case "started failing" this week when it ends the week failing and its failing streak began
 *   inside the week (after a pass or warn, or on its very first run); "fixed" when it ends the
 *   week passing after having been failing at the start of the week or during it.
 * - "Still failing" and "longest failing" consider only cases that ran in the two weeks, so a
 *   case dropped from CI while failing does not haunt every digest after.
 */

export type Verdict = 'pass' | 'warn' | 'fail' | 'error';

export interface CaseRunRow {
  caseId: string;
  caseName: string;
  buildId: string;
  buildKey: string;
  buildStartedAt: Date;
  runId: string;
  verdict: Verdict;
}

/** The last judged (pass, warn or fail) verdict of a case before the week began. */
export interface CaseStateRow {
  caseId: string;
  verdict: Exclude<Verdict, 'error'>;
}

/** A case failing at the end of the week, with the first failing run of its current streak. */
export interface OpenStreakRow {
  caseId: string;
  caseName: string;
  sinceBuildKey: string;
  sinceStartedAt: Date;
  sinceRunId: string;
  /** Builds in a row in which the case failed, up to the end of the week. */
  failingBuilds: number;
}

export interface PassRate {
  passed: number;
  judged: number;
  /** passed / judged, or null when nothing was judged. */
  rate: number | null;
}

export interface StartedFailing {
  caseId: string;
  caseName: string;
  /** The first failing build of the streak. */
  buildKey: string;
  startedAt: Date;
  runId: string;
  /** The case had never been judged before this streak. */
  newCase: boolean;
}

export interface Fixed {
  caseId: string;
  caseName: string;
  /** The build in which the case passed again. */
  buildKey: string;
  startedAt: Date;
  runId: string;
}

export interface DigestSummary {
  passRate: PassRate;
  previousPassRate: PassRate;
  /** Change of the pass rate in percentage points, null when either week judged nothing. */
  passRateChange: number | null;
  verdictCounts: Record<Verdict, number>;
  startedFailing: StartedFailing[];
  fixed: Fixed[];
  /** Cases failing at the end of the week whose streak began before it. */
  stillFailing: number;
  longestFailing: OpenStreakRow | null;
}

export function passRateOf(runs: readonly Pick<CaseRunRow, 'verdict'>[]): PassRate {
  let passed = 0;
  for (const r of runs) if (r.verdict === 'pass' || r.verdict === 'warn') passed++;
  return { passed, judged: runs.length, rate: runs.length > 0 ? passed / runs.length : null };
}

/** Orders runs as the branch saw them: by build start, then build id (a stable tie-break). */
export function byBuildOrder(a: CaseRunRow, b: CaseRunRow): number {
  return (
    a.buildStartedAt.getTime() - b.buildStartedAt.getTime() ||
    (a.buildId < b.buildId ? -1 : a.buildId > b.buildId ? 1 : 0)
  );
}

type CaseState = 'ok' | 'failing' | 'new';

/**
 * Summarises a week. `runs` holds the case runs of both weeks ([previousStart, end)); `before`
 * the last judged verdict of each case before `previousStart`; `openStreaks` the cases failing at
 * `end` with the start of their streak (it may lie far before the week).
 */
export function summariseDigest(input: {
  start: Date;
  end: Date;
  runs: readonly CaseRunRow[];
  before: readonly CaseStateRow[];
  openStreaks: readonly OpenStreakRow[];
}): DigestSummary {
  const startMs = input.start.getTime();
  const endMs = input.end.getTime();
  const sorted = [...input.runs].filter((r) => r.buildStartedAt.getTime() < endMs).sort(byBuildOrder);
  const previous = sorted.filter((r) => r.buildStartedAt.getTime() < startMs);
  const week = sorted.filter((r) => r.buildStartedAt.getTime() >= startMs);

  // Each case's state when the week began: its last judged verdict, previous week included.
  const state = new Map<string, CaseState>();
  for (const b of input.before) state.set(b.caseId, b.verdict === 'fail' ? 'failing' : 'ok');
  for (const r of previous) {
    if (r.verdict === 'error') continue;
    state.set(r.caseId, r.verdict === 'fail' ? 'failing' : 'ok');
  }

  const startedFailing = new Map<string, StartedFailing>();
  const fixed = new Map<string, Fixed>();
  for (const r of week) {
    if (r.verdict === 'error') continue;
    const was = state.get(r.caseId) ?? 'new';
    if (r.verdict === 'fail' && was !== 'failing') {
      startedFailing.set(r.caseId, {
        caseId: r.caseId,
        caseName: r.caseName,
        buildKey: r.buildKey,
        startedAt: r.buildStartedAt,
        runId: r.runId,
        newCase: was === 'new',
      });
      fixed.delete(r.caseId);
      state.set(r.caseId, 'failing');
    } else if (r.verdict !== 'fail' && was === 'failing') {
      fixed.set(r.caseId, {
        caseId: r.caseId,
        caseName: r.caseName,
        buildKey: r.buildKey,
        startedAt: r.buildStartedAt,
        runId: r.runId,
      });
      startedFailing.delete(r.caseId);
      state.set(r.caseId, 'ok');
    } else if (r.verdict !== 'fail') {
      state.set(r.caseId, 'ok');
    }
  }

  // A case that has not run for the two weeks (renamed, dropped from CI) is left out.
  const active = new Set(sorted.map((r) => r.caseId));
  const failingAtEnd = [...state.entries()].filter(([id, s]) => s === 'failing' && active.has(id)).map(([id]) => id);
  const stillFailing = failingAtEnd.filter((id) => !startedFailing.has(id)).length;

  // The longest open streak: the earliest start, then the most failing builds.
  const open = input.openStreaks.filter((s) => state.get(s.caseId) === 'failing' && active.has(s.caseId));
  const longestFailing =
    [...open].sort(
      (a, b) =>
        a.sinceStartedAt.getTime() - b.sinceStartedAt.getTime() ||
        b.failingBuilds - a.failingBuilds ||
        a.caseName.localeCompare(b.caseName),
    )[0] ?? null;

  const verdictCounts: Record<Verdict, number> = { pass: 0, warn: 0, fail: 0, error: 0 };
  for (const r of week) verdictCounts[r.verdict]++;

  const passRate = passRateOf(week);
  const previousPassRate = passRateOf(previous);
  const passRateChange =
    passRate.rate !== null && previousPassRate.rate !== null
      ? roundTo((passRate.rate - previousPassRate.rate) * 100, 1)
      : null;

  const byStart = (a: { startedAt: Date; caseName: string }, b: { startedAt: Date; caseName: string }) =>
    a.startedAt.getTime() - b.startedAt.getTime() || a.caseName.localeCompare(b.caseName);
  return {
    passRate,
    previousPassRate,
    passRateChange,
    verdictCounts,
    startedFailing: [...startedFailing.values()].sort(byStart),
    fixed: [...fixed.values()].sort(byStart),
    stillFailing,
    longestFailing,
  };
}

function roundTo(value: number, digits: number): number {
  const f = 10 ** digits;
  const r = Math.round(value * f) / f;
  return Object.is(r, -0) ? 0 : r;
}
