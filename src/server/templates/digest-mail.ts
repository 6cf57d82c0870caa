import type { DigestSummary } from '@/src/lib/digest-summary';
import type { AppUrls } from '@/src/lib/app-urls';
import {
  escapeHtml,
  footerText,
  formatDay,
  formatDayTime,
  formatPercent,
  formatPointsChange,
  frameHtml,
  link,
  plural,
  subjectLine,
  verdictBadge,
  type RenderedMail,
} from './mail-parts';

/** One project's weekly digest for one subscriber (or a preview of it). */
export interface DigestMailInput {
  workspaceName: string;
  project: { slug: string; name: string; defaultBranch: string };
  period: { start: Date; end: Date };
  /** The subscriber's time zone: every date in the mail is shown in it. */
  timeZone: string;
  summary: DigestSummary;
  /** Builds of the week on the default branch, newest first. */
  builds: { key: string; verdict: string | null; startedAt: Date }[];
  /** Builds of the week on other branches (counted, not listed). */
  otherBranchBuilds: number;
  /** The worst finding of a run, by run id, for the cases that started failing. */
  worstFindings: Record<string, string | null>;
  urls: AppUrls;
  unsubscribeUrl: string;
  /** A preview sent on request, not the scheduled digest. */
  preview?: boolean;
}

const MAX_LISTED_BUILDS = 20;

function stillFailingText(n: number): string {
  return n === 1
    ? '1 case that failed before this week still fails.'
    : `${n} cases that failed before this week still fail.`;
}

function passRateLine(s: DigestSummary): string {
  if (s.passRate.rate === null) return 'Pass rate: no case runs were judged this week.';
  const base = `Pass rate: ${formatPercent(s.passRate.rate)} (${s.passRate.passed} of ${plural(s.passRate.judged, 'case run')} passed or warned)`;
  if (s.previousPassRate.rate === null) return `${base}; no runs the week before to compare with.`;
  return `${base}; ${formatPointsChange(s.passRateChange)} from ${formatPercent(s.previousPassRate.rate)} the week before.`;
}

function buildCountLine(input: DigestMailInput): string {
  const counts = { pass: 0, warn: 0, fail: 0, error: 0, open: 0 };
  for (const b of input.builds) counts[(b.verdict ?? 'open') as keyof typeof counts]++;
  const parts = (['pass', 'warn', 'fail', 'error', 'open'] as const)
    .filter((k) => counts[k] > 0)
    .map((k) => `${counts[k]} ${k}`);
  const main = `${plural(input.builds.length, 'build')} on ${input.project.defaultBranch}${parts.length ? ` (${parts.join(', ')})` : ''}`;
  return input.otherBranchBuilds > 0
    ? `${main}; ${plural(input.otherBranchBuilds, 'more build')} on other branches.`
    : `${main}.`;
}

export function renderDigestMail(input: DigestMailInput): RenderedMail {
  const { summary: s, project, urls, timeZone } = input;
  const failing = s.startedFailing.length;
  const headline =
    failing > 0
      ? `${plural(failing, 'case')} started failing`
      : s.passRate.rate === null
        ? 'no runs this week'
        : `pass rate ${formatPercent(s.passRate.rate)}`;
  const subject = subjectLine(`${input.preview ? '[Preview] ' : ''}${project.name}: weekly digest, ${headline}`);
  const periodText = `${formatDay(input.period.start, timeZone)} to ${formatDayTime(input.period.end, timeZone)} (${timeZone})`;
  const title = `${project.name} (${project.defaultBranch}), week to ${formatDay(input.period.end, timeZone)}`;
  const reason = input.preview
    ? 'You asked for this preview of the weekly digest from your notification settings.'
    : `You receive this weekly digest because this address is subscribed to ${project.name} in ${input.workspaceName}.`;
  const footer = {
    reason,
    settingsUrl: urls.notificationSettings,
    unsubscribeUrl: input.unsubscribeUrl,
    unsubscribeLabel: 'Unsubscribe from this digest',
  };
  const worst = (runId: string) => input.worstFindings[runId] ?? null;
  const listed = input.builds.slice(0, MAX_LISTED_BUILDS);
  const moreBuilds = input.builds.length - listed.length;

  // ---- plain text ----
  const t: string[] = [];
  if (input.preview) t.push('PREVIEW: this is what your weekly digest would say right now.', '');
  t.push(title, periodText, '', buildCountLine(input), passRateLine(s), '');
  t.push(`Started failing (${failing})`);
  if (failing === 0) t.push('  none');
  for (const c of s.startedFailing) {
    t.push(
      `- ${c.caseName}: first failing build ${c.buildKey} (${formatDay(c.startedAt, timeZone)})${c.newCase ? ', a new case' : ''}`,
    );
    const w = worst(c.runId);
    if (w) t.push(`  worst finding: ${w}`);
    t.push(`  ${urls.run(c.runId)}`);
  }
  t.push('', `Fixed (${s.fixed.length})`);
  if (s.fixed.length === 0) t.push('  none');
  for (const c of s.fixed)
    t.push(
      `- ${c.caseName}: passes again since build ${c.buildKey} (${formatDay(c.startedAt, timeZone)})`,
      `  ${urls.run(c.runId)}`,
    );
  t.push('', 'Longest failing case');
  if (s.longestFailing) {
    const l = s.longestFailing;
    t.push(
      `- ${l.caseName}: failing since build ${l.sinceBuildKey} (${formatDay(l.sinceStartedAt, timeZone)}), ${plural(l.failingBuilds, 'failing build')} in a row`,
    );
    t.push(`  ${urls.run(l.sinceRunId)}`);
  } else {
    t.push('  no case is failing');
  }
  if (s.stillFailing > 0) t.push(`  (${stillFailingText(s.stillFailing)})`);
  t.push('', 'Builds this week');
  if (listed.length === 0) t.push('  none');
  for (const b of listed)
    t.push(
      `- ${b.key}  ${(b.verdict ?? 'open').toUpperCase()}  ${formatDay(b.startedAt, timeZone)}  ${urls.build(project.slug, b.key)}`,
    );
  if (moreBuilds > 0) t.push(`  ... and ${moreBuilds} more on the project page.`);
  t.push('', `Project: ${urls.project(project.slug)}`, '', ...footerText(footer));
  const text = t.join('\n');

  // ---- HTML ----
  const h: string[] = [];
  const section = (heading: string) => `<h2 style="font-size:15px;margin:20px 0 6px">${escapeHtml(heading)}</h2>`;
  if (input.preview) {
    h.push(
      '<p style="background:#eff6ff;border:1px solid #bfdbfe;padding:8px 10px;border-radius:6px">Preview: this is what your weekly digest would say right now.</p>',
    );
  }
  h.push(`<h1 style="font-size:19px;margin:0 0 4px">${escapeHtml(title)}</h1>`);
  h.push(`<p style="margin:0 0 12px;color:#475569">${escapeHtml(periodText)}</p>`);
  h.push(`<p style="margin:0">${escapeHtml(buildCountLine(input))}<br>${escapeHtml(passRateLine(s))}</p>`);

  h.push(section(`Started failing (${failing})`));
  if (failing === 0) h.push('<p style="margin:0;color:#475569">None.</p>');
  else {
    h.push('<ul style="margin:0;padding-left:18px">');
    for (const c of s.startedFailing) {
      const w = worst(c.runId);
      h.push(
        `<li style="margin-bottom:6px"><strong>${escapeHtml(c.caseName)}</strong>: first failing build ${link(urls.build(project.slug, c.buildKey), c.buildKey)} (${escapeHtml(formatDay(c.startedAt, timeZone))})${c.newCase ? ', a new case' : ''}` +
          `${w ? `<br><span style="color:#475569">Worst finding: ${escapeHtml(w)}</span>` : ''}<br>${link(urls.run(c.runId), 'Open the run')}</li>`,
      );
    }
    h.push('</ul>');
  }

  h.push(section(`Fixed (${s.fixed.length})`));
  if (s.fixed.length === 0) h.push('<p style="margin:0;color:#475569">None.</p>');
  else {
    h.push('<ul style="margin:0;padding-left:18px">');
    for (const c of s.fixed) {
      h.push(
        `<li><strong>${escapeHtml(c.caseName)}</strong>: passes again since build ${link(urls.build(project.slug, c.buildKey), c.buildKey)} (${escapeHtml(formatDay(c.startedAt, timeZone))})</li>`,
      );
    }
    h.push('</ul>');
  }

  h.push(section('Longest failing case'));
  if (s.longestFailing) {
    const l = s.longestFailing;
    h.push(
      `<p style="margin:0"><strong>${escapeHtml(l.caseName)}</strong>: failing since build ${link(urls.build(project.slug, l.sinceBuildKey), l.sinceBuildKey)} (${escapeHtml(formatDay(l.sinceStartedAt, timeZone))}), ${escapeHtml(plural(l.failingBuilds, 'failing build'))} in a row. ${link(urls.run(l.sinceRunId), 'First failing run')}</p>`,
    );
  } else {
    h.push('<p style="margin:0;color:#475569">No case is failing.</p>');
  }
  if (s.stillFailing > 0)
    h.push(`<p style="margin:4px 0 0;color:#475569">${escapeHtml(stillFailingText(s.stillFailing))}</p>`);

  h.push(section('Builds this week'));
  if (listed.length === 0) h.push('<p style="margin:0;color:#475569">None.</p>');
  else {
    h.push('<table role="presentation" cellpadding="0" cellspacing="0" style="border-collapse:collapse;width:100%">');
    for (const b of listed) {
      h.push(
        `<tr><td style="padding:3px 8px 3px 0">${link(urls.build(project.slug, b.key), b.key)}</td><td style="padding:3px 8px">${verdictBadge(b.verdict)}</td><td style="padding:3px 0;color:#475569">${escapeHtml(formatDay(b.startedAt, timeZone))}</td></tr>`,
      );
    }
    h.push('</table>');
    if (moreBuilds > 0)
      h.push(`<p style="margin:4px 0 0;color:#475569">... and ${moreBuilds} more on the project page.</p>`);
  }
  h.push(`<p style="margin:20px 0 0">${link(urls.project(project.slug), `Open ${project.name} in Varigate`)}</p>`);

  const preheader = `${buildCountLine(input)} ${passRateLine(s)}`;
  return { subject, text, html: frameHtml({ title: subject, preheader, body: h.join('\n'), footer }) };
}
