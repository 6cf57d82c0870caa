import { describe, expect, it } from 'vitest';
import { appUrls } from '@/src/lib/app-urls';
import type { DigestSummary } from '@/src/lib/digest-summary';
import { renderAlertMail } from '@/src/server/templates/alert-mail';
import { renderDigestMail, type DigestMailInput } from '@/src/server/templates/digest-mail';
import { escapeHtml, formatPointsChange, PASS_NOTE, subjectLine } from '@/src/server/templates/mail-parts';

const urls = appUrls('https://varigate.example.com/', 'heronsea');
const end = new Date('2026-11-30T07:00:00Z');
const start = new Date('2026-11-23T07:00:00Z');
const nasty = '<script>alert("x")</script>&co';

const summary: DigestSummary = {
  passRate: { passed: 9, judged: 12, rate: 0.75 },
  previousPassRate: { passed: 11, judged: 12, rate: 11 / 12 },
  passRateChange: -16.7,
  verdictCounts: { pass: 8, warn: 1, fail: 3, error: 0 },
  startedFailing: [
    {
      caseId: 'c1',
      caseName: nasty,
      buildKey: 'nightly 7/a',
      startedAt: new Date('2026-11-25T02:00:00Z'),
      runId: 'run-1',
      newCase: false,
    },
  ],
  fixed: [
    {
      caseId: 'c2',
      caseName: 'lagoon-flush',
      buildKey: 'nightly-8',
      startedAt: new Date('2026-11-26T02:00:00Z'),
      runId: 'run-2',
    },
  ],
  stillFailing: 1,
  longestFailing: {
    caseId: 'c3',
    caseName: 'spit-erosion',
    sinceBuildKey: 'nightly-1',
    sinceStartedAt: new Date('2026-10-01T02:00:00Z'),
    sinceRunId: 'run-3',
    failingBuilds: 41,
  },
};

const digestInput: DigestMailInput = {
  workspaceName: 'Heron Sea Modelling',
  project: { slug: 'heron-tides', name: 'Heron tidal model', defaultBranch: 'main' },
  period: { start, end },
  timeZone: 'Europe/Oslo',
  summary,
  builds: [
    { key: 'nightly 7/a', verdict: 'fail', startedAt: new Date('2026-11-25T02:00:00Z') },
    { key: 'nightly-6', verdict: 'pass', startedAt: new Date('2026-11-24T02:00:00Z') },
  ],
  otherBranchBuilds: 3,
  worstFindings: { 'run-1': 'TV grew by 3.1e-2 at step 12 <x>' },
  urls,
  unsubscribeUrl: 'https://varigate.example.com/unsubscribe?token=abc.def',
};

describe('renderDigestMail', () => {
  const mail = renderDigestMail(digestInput);

  it('escapes every data value in the HTML part', () => {
    expect(mail.html).not.toContain('<script>');
    expect(mail.html).toContain('&lt;script&gt;alert(&quot;x&quot;)&lt;/script&gt;&amp;co');
    expect(mail.html).toContain('at step 12 &lt;x&gt;');
  });

  it('gives the counts, the pass rate and its change in both parts', () => {
    for (const part of [mail.text, mail.html]) {
      expect(part).toContain('2 builds on main (1 pass, 1 fail)');
      expect(part).toContain('3 more builds on other branches');
      expect(part).toContain('75.0 %');
      expect(part).toContain('-16.7 points from 91.7 %');
    }
    expect(mail.text).toContain('Started failing (1)');
    expect(mail.text).toContain('Fixed (1)');
    expect(mail.text).toContain('spit-erosion: failing since build nightly-1');
    expect(mail.text).toContain('41 failing builds in a row');
  });

  it('links the runs, builds (URL-encoded), project, settings and unsubscribe page in the text part', () => {
    expect(mail.text).toContain('https://varigate.example.com/w/heronsea/runs/run-1');
    expect(mail.text).toContain('https://varigate.example.com/w/heronsea/projects/heron-tides/builds/nightly%207%2Fa');
    expect(mail.text).toContain('https://varigate.example.com/w/heronsea/projects/heron-tides');
    expect(mail.text).toContain('https://varigate.example.com/w/heronsea/settings/notifications');
    expect(mail.text).toContain('https://varigate.example.com/unsubscribe?token=abc.def');
    expect(mail.html).toContain('href="https://varigate.example.com/unsubscribe?token=abc.def"');
  });

  it('says what a pass does not prove and uses no images', () => {
    expect(mail.text).toContain(PASS_NOTE);
    expect(mail.html).toContain(escapeHtml(PASS_NOTE));
    expect(mail.html).not.toMatch(/<img/i);
  });

  it('names the first failing case count in the subject and marks a preview as such', () => {
    expect(mail.subject).toBe('Heron tidal model: weekly digest, 1 case started failing');
    const preview = renderDigestMail({ ...digestInput, preview: true });
    expect(preview.subject.startsWith('[Preview] ')).toBe(true);
    expect(preview.text).toContain('PREVIEW');
  });

  it('shows dates in the subscriber time zone', () => {
    // 07:00 UTC on 30 November is 08:00 in Oslo.
    expect(mail.text).toContain('Mon 30 Nov 2026, 08:00 (Europe/Oslo)');
  });
});

describe('renderAlertMail', () => {
  const mail = renderAlertMail({
    workspaceName: 'Heron Sea Modelling',
    project: { slug: 'heron-tides', name: 'Heron tidal model' },
    build: { key: 'nightly-9', commit: '0123456789abcdef0123', branch: 'main', ciUrl: 'javascript:alert(1)' },
    cases: [
      { caseName: nasty, runId: 'run-9', lastPassingBuildKey: 'nightly-8', worstFinding: 'New extrema: 4 at step 3' },
      { caseName: 'brand-new', runId: 'run-10', lastPassingBuildKey: null, worstFinding: null },
    ],
    urls,
    unsubscribeUrl: 'https://varigate.example.com/unsubscribe?token=t.s',
  });

  it('lists every newly failing case of the build with its run link, in one mail', () => {
    expect(mail.subject).toBe('Heron tidal model: 2 cases started failing in build nightly-9');
    expect(mail.text).toContain('https://varigate.example.com/w/heronsea/runs/run-9');
    expect(mail.text).toContain('https://varigate.example.com/w/heronsea/runs/run-10');
    expect(mail.text).toContain('passed in build nightly-8');
    expect(mail.text).toContain('a new case, first run');
    expect(mail.text).toContain('commit 0123456789ab');
  });

  it('escapes case names and never links a CI address that is not http(s)', () => {
    expect(mail.html).not.toContain('<script>');
    expect(mail.html).not.toContain('href="javascript:');
  });

  it('carries the pass note and the unsubscribe link', () => {
    expect(mail.text).toContain(PASS_NOTE);
    expect(mail.text).toContain(
      'Stop failure alerts for this project: https://varigate.example.com/unsubscribe?token=t.s',
    );
  });
});

describe('mail-parts', () => {
  it('keeps subjects on one line and bounded', () => {
    expect(subjectLine('a\r\nBcc: x@example.com')).toBe('a Bcc: x@example.com');
    expect(subjectLine('x'.repeat(400)).length).toBe(180);
  });

  it('formats point changes with a sign and singular', () => {
    expect(formatPointsChange(2.5)).toBe('+2.5 points');
    expect(formatPointsChange(-1)).toBe('-1 point');
    expect(formatPointsChange(0)).toBe('no change');
    expect(formatPointsChange(null)).toBe('no comparison');
  });
});
