import { describe, expect, it } from 'vitest';
import {
  passRateOf,
  summariseDigest,
  type CaseRunRow,
  type OpenStreakRow,
  type Verdict,
} from '@/src/lib/digest-summary';

const DAY = 86_400_000;
const end = new Date('2026-11-30T07:00:00Z');
const start = new Date(end.getTime() - 7 * DAY);

/** A case run `daysBeforeEnd` days before the end of the week, in build `nightly-<n>`. */
function run(caseName: string, daysBeforeEnd: number, verdict: Verdict): CaseRunRow {
  const startedAt = new Date(end.getTime() - daysBeforeEnd * DAY);
  const n = 100 - daysBeforeEnd;
  return {
    caseId: `id-${caseName}`,
    caseName,
    buildId: `b-${n}`,
    buildKey: `nightly-${n}`,
    buildStartedAt: startedAt,
    runId: `r-${caseName}-${n}`,
    verdict,
  };
}

function streak(caseName: string, sinceDaysBeforeEnd: number, failingBuilds: number): OpenStreakRow {
  const n = 100 - sinceDaysBeforeEnd;
  return {
    caseId: `id-${caseName}`,
    caseName,
    sinceBuildKey: `nightly-${n}`,
    sinceStartedAt: new Date(end.getTime() - sinceDaysBeforeEnd * DAY),
    sinceRunId: `r-${caseName}-${n}`,
    failingBuilds,
  };
}

describe('summariseDigest', () => {
  it('lists a case that went from pass to fail this week with its first failing build', () => {
    const s = summariseDigest({
      start,
      end,
      runs: [
        run('fjord-front', 9, 'pass'),
        run('fjord-front', 5, 'pass'),
        run('fjord-front', 4, 'fail'),
        run('fjord-front', 2, 'fail'),
      ],
      before: [],
      openStreaks: [streak('fjord-front', 4, 2)],
    });
    expect(s.startedFailing).toEqual([
      {
        caseId: 'id-fjord-front',
        caseName: 'fjord-front',
        buildKey: 'nightly-96',
        startedAt: new Date(end.getTime() - 4 * DAY),
        runId: 'r-fjord-front-96',
        newCase: false,
      },
    ]);
    expect(s.fixed).toEqual([]);
    expect(s.stillFailing).toBe(0);
    expect(s.longestFailing?.caseName).toBe('fjord-front');
  });

  it('does not list a case that was already failing before the week as newly failing', () => {
    const s = summariseDigest({
      start,
      end,
      runs: [run('dune-creep', 3, 'fail'), run('dune-creep', 1, 'fail')],
      before: [{ caseId: 'id-dune-creep', verdict: 'fail' }],
      openStreaks: [streak('dune-creep', 40, 30)],
    });
    expect(s.startedFailing).toEqual([]);
    expect(s.stillFailing).toBe(1);
    expect(s.longestFailing).toMatchObject({ caseName: 'dune-creep', failingBuilds: 30 });
  });

  it('marks a case failing on its very first run as a new case', () => {
    const s = summariseDigest({
      start,
      end,
      runs: [run('new-weir', 2, 'fail')],
      before: [],
      openStreaks: [streak('new-weir', 2, 1)],
    });
    expect(s.startedFailing[0]).toMatchObject({ caseName: 'new-weir', newCase: true });
  });

  it('lists a case failing at the start of the week that passes at its end as fixed, with the build that fixed it', () => {
    const s = summariseDigest({
      start,
      end,
      runs: [
        run('shoal-wave', 10, 'fail'),
        run('shoal-wave', 6, 'fail'),
        run('shoal-wave', 3, 'warn'),
        run('shoal-wave', 1, 'pass'),
      ],
      before: [],
      openStreaks: [],
    });
    expect(s.fixed.map((f) => [f.caseName, f.buildKey])).toEqual([['shoal-wave', 'nightly-97']]);
    expect(s.startedFailing).toEqual([]);
    expect(s.longestFailing).toBeNull();
  });

  it('lets error runs neither start nor end a failing streak', () => {
    const s = summariseDigest({
      start,
      end,
      runs: [
        run('reef-pulse', 9, 'pass'),
        run('reef-pulse', 5, 'error'),
        run('marsh-drain', 9, 'fail'),
        run('marsh-drain', 4, 'error'),
      ],
      before: [],
      openStreaks: [streak('marsh-drain', 9, 1)],
    });
    expect(s.startedFailing).toEqual([]);
    expect(s.fixed).toEqual([]);
    expect(s.stillFailing).toBe(1);
  });

  it('reports the last streak of a case that failed, recovered and failed again within the week', () => {
    const s = summariseDigest({
      start,
      end,
      runs: [run('inlet', 6, 'fail'), run('inlet', 4, 'pass'), run('inlet', 2, 'fail')],
      before: [{ caseId: 'id-inlet', verdict: 'pass' }],
      openStreaks: [streak('inlet', 2, 1)],
    });
    expect(s.startedFailing.map((c) => c.buildKey)).toEqual(['nightly-98']);
    expect(s.fixed).toEqual([]);
  });

  it('computes the pass rate with warn as passing and error as not, and its change in points', () => {
    const s = summariseDigest({
      start,
      end,
      runs: [
        // previous week: 3 of 4 pass (75 %)
        run('a', 10, 'pass'),
        run('b', 10, 'pass'),
        run('c', 10, 'pass'),
        run('d', 10, 'fail'),
        // this week: pass, warn, fail, error -> 2 of 4 (50 %)
        run('a', 3, 'pass'),
        run('b', 3, 'warn'),
        run('c', 3, 'fail'),
        run('d', 3, 'error'),
      ],
      before: [],
      openStreaks: [],
    });
    expect(s.passRate).toEqual({ passed: 2, judged: 4, rate: 0.5 });
    expect(s.previousPassRate).toEqual({ passed: 3, judged: 4, rate: 0.75 });
    expect(s.passRateChange).toBe(-25);
    expect(s.verdictCounts).toEqual({ pass: 1, warn: 1, fail: 1, error: 1 });
  });

  it('has no pass-rate change when either week judged nothing', () => {
    const s = summariseDigest({ start, end, runs: [run('a', 2, 'pass')], before: [], openStreaks: [] });
    expect(s.passRateChange).toBeNull();
    expect(summariseDigest({ start, end, runs: [], before: [], openStreaks: [] }).passRate.rate).toBeNull();
  });

  it('picks the longest failing case by the earliest streak start and leaves out cases that did not run for two weeks', () => {
    const s = summariseDigest({
      start,
      end,
      runs: [run('young', 2, 'fail'), run('old', 2, 'fail')],
      before: [
        { caseId: 'id-young', verdict: 'fail' },
        { caseId: 'id-old', verdict: 'fail' },
        { caseId: 'id-retired', verdict: 'fail' },
      ],
      openStreaks: [streak('young', 20, 5), streak('old', 60, 40), streak('retired', 300, 90)],
    });
    expect(s.longestFailing?.caseName).toBe('old');
    expect(s.stillFailing).toBe(2);
  });

  it('ignores runs of builds that started at or after the end of the week', () => {
    // Half a day before the end counts; exactly at the end and after do not.
    const s = summariseDigest({
      start,
      end,
      runs: [run('late', 0.5, 'pass'), run('late', 0, 'fail'), run('late', -1, 'fail')],
      before: [],
      openStreaks: [],
    });
    expect(s.startedFailing).toEqual([]);
    expect(s.passRate.judged).toBe(1);
  });
});

describe('passRateOf', () => {
  it('is null for no runs and counts pass and warn as passed', () => {
    expect(passRateOf([])).toEqual({ passed: 0, judged: 0, rate: null });
    expect(passRateOf([{ verdict: 'warn' }, { verdict: 'fail' }])).toEqual({ passed: 1, judged: 2, rate: 0.5 });
  });
});
