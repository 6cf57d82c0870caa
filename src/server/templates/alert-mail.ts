import type { AppUrls } from '@/src/lib/app-urls';
import { escapeHtml, footerText, frameHtml, link, plural, subjectLine, type RenderedMail } from './mail-parts';

/** One alert mail: the cases of one build that started failing, for one subscriber. */
export interface AlertMailInput {
  workspaceName: string;
  project: { slug: string; name: string };
  build: { key: string; commit: string; branch: string; ciUrl: string | null };
  cases: {
    caseName: string;
    runId: string;
    /** The last build in which the case passed (or warned), null for a case never judged before. */
    lastPassingBuildKey: string | null;
    worstFinding: string | null;
  }[];
  urls: AppUrls;
  unsubscribeUrl: string;
}

export function renderAlertMail(input: AlertMailInput): RenderedMail {
  const { project, build, urls } = input;
  const n = input.cases.length;
  const first = input.cases[0];
  const subject = subjectLine(
    n === 1 && first
      ? `${project.name}: ${first.caseName} started failing in build ${build.key}`
      : `${project.name}: ${plural(n, 'case')} started failing in build ${build.key}`,
  );
  const commit = build.commit.slice(0, 12);
  const intro = `${n === 1 ? 'A case' : `${plural(n, 'case')}`} of ${project.name} started failing in build ${build.key} on ${build.branch} (commit ${commit}).`;
  const footer = {
    reason: `You receive failure alerts for ${project.name} in ${input.workspaceName}. A case that keeps failing is not alerted again; the weekly digest lists it.`,
    settingsUrl: urls.notificationSettings,
    unsubscribeUrl: input.unsubscribeUrl,
    unsubscribeLabel: 'Stop failure alerts for this project',
  };
  const since = (c: AlertMailInput['cases'][number]) =>
    c.lastPassingBuildKey ? `passed in build ${c.lastPassingBuildKey}` : 'a new case, first run';

  const t: string[] = [intro, ''];
  for (const c of input.cases) {
    t.push(`- ${c.caseName} (${since(c)})`);
    if (c.worstFinding) t.push(`  worst finding: ${c.worstFinding}`);
    t.push(`  ${urls.run(c.runId)}`);
  }
  t.push('', `Build: ${urls.build(project.slug, build.key)}`);
  if (build.ciUrl) t.push(`CI: ${build.ciUrl}`);
  t.push('', ...footerText(footer));

  const h: string[] = [];
  h.push(
    `<h1 style="font-size:19px;margin:0 0 8px">${escapeHtml(n === 1 && first ? `${first.caseName} started failing` : `${plural(n, 'case')} started failing`)}</h1>`,
  );
  h.push(`<p style="margin:0 0 12px">${escapeHtml(intro)}</p>`);
  h.push('<ul style="margin:0;padding-left:18px">');
  for (const c of input.cases) {
    h.push(
      `<li style="margin-bottom:6px"><strong>${escapeHtml(c.caseName)}</strong> <span style="color:#475569">(${escapeHtml(since(c))})</span>` +
        `${c.worstFinding ? `<br><span style="color:#475569">Worst finding: ${escapeHtml(c.worstFinding)}</span>` : ''}<br>${link(urls.run(c.runId), 'Open the run')}</li>`,
    );
  }
  h.push('</ul>');
  const ci = build.ciUrl && /^https?:\/\//i.test(build.ciUrl) ? ` &middot; ${link(build.ciUrl, 'CI build')}` : '';
  h.push(`<p style="margin:16px 0 0">${link(urls.build(project.slug, build.key), `Open build ${build.key}`)}${ci}</p>`);

  return {
    subject,
    text: t.join('\n'),
    html: frameHtml({ title: subject, preheader: intro, body: h.join('\n'), footer }),
  };
}
