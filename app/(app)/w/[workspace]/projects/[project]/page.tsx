import type { Metadata } from 'next';
import Link from 'next/link';
import { PassRateChart } from '@/src/components/project/pass-rate-chart';
import { Card } from '@/src/components/ui/card';
import { Pager } from '@/src/components/ui/pager';
import { VerdictBadge } from '@/src/components/ui/verdict-badge';
import { formatAgo, formatDateTime, shortCommit } from '@/src/lib/format';
import { roleAtLeast } from '@/src/server/auth/roles';
import { requireMember } from '@/src/server/auth/session';
import { getProjectView, TREND_DAYS, TREND_WINDOW } from '@/src/server/services/views';

export const metadata: Metadata = { title: 'Project' };
export const dynamic = 'force-dynamic';

export default async function ProjectPage({
  params,
  searchParams,
}: {
  params: Promise<{ workspace: string; project: string }>;
  searchParams: Promise<{ page?: string }>;
}) {
  const { workspace, project: slug } = await params;
  const ctx = await requireMember(workspace);
  const page = Math.max(1, Number.parseInt((await searchParams).page ?? '1', 10) || 1);
  const view = await getProjectView(ctx, slug, page);
  const base = `/w/${workspace}/projects/${slug}`;
  const trend = view.trend;
  const failing = view.cases.filter((c) => c.verdict === 'fail' || c.verdict === 'error').length;

  return (
    <div className="space-y-6">
      <div className="flex flex-wrap items-end justify-between gap-4">
        <div>
          <p className="text-sm text-slate-500">
            <Link href={`/w/${workspace}`} className="hover:underline">
              Overview
            </Link>{' '}
            / project
          </p>
          <h1 className="text-2xl font-semibold">{view.project.name}</h1>
          <p className="mt-1 text-sm text-slate-500">
            {view.cases.length} cases · {failing} failing on{' '}
            <span className="font-mono">{view.project.defaultBranch}</span>
          </p>
        </div>
        {roleAtLeast(ctx.role, 'maintainer') ? (
          <Link
            href={`${base}/settings`}
            className="rounded-md border border-slate-300 px-3 py-1.5 text-sm hover:bg-slate-50 dark:border-slate-700 dark:hover:bg-slate-800"
          >
            Project settings
          </Link>
        ) : null}
      </div>

      <Card
        title={`Builds on ${view.project.defaultBranch}, last ${TREND_DAYS} days (line: ${TREND_WINDOW}-day pass rate)`}
      >
        <PassRateChart points={trend} window={TREND_WINDOW} />
      </Card>

      <Card title="Cases">
        {view.cases.length === 0 ? (
          <p className="text-sm text-slate-500">No cases yet: they appear with the first upload that names them.</p>
        ) : (
          <div className="overflow-x-auto">
            <table className="w-full text-left text-sm" data-testid="project-cases">
              <thead className="text-xs uppercase tracking-wide text-slate-500">
                <tr>
                  <th scope="col" className="py-2 pr-3">
                    Case
                  </th>
                  <th scope="col" className="py-2 pr-3">
                    Verdict
                  </th>
                  <th scope="col" className="py-2 pr-3">
                    Since build
                  </th>
                  <th scope="col" className="py-2 pr-3">
                    Latest run
                  </th>
                </tr>
              </thead>
              <tbody className="divide-y divide-slate-100 dark:divide-slate-800">
                {view.cases.map((c) => (
                  <tr key={c.caseName}>
                    <td className="py-2 pr-3">
                      <Link
                        className="text-sky-700 hover:underline dark:text-sky-400"
                        href={`${base}/cases/${encodeURIComponent(c.caseName)}`}
                      >
                        {c.caseName}
                      </Link>
                    </td>
                    <td className="py-2 pr-3">
                      <VerdictBadge verdict={c.verdict} />
                    </td>
                    <td className="py-2 pr-3">
                      {c.sinceBuildKey ? (
                        <>
                          <Link
                            className="font-mono hover:underline"
                            href={`${base}/builds/${encodeURIComponent(c.sinceBuildKey)}`}
                          >
                            {c.sinceBuildKey}
                          </Link>
                          <span className="text-slate-500">
                            {' '}
                            {c.changed
                              ? c.verdict === 'fail' || c.verdict === 'error'
                                ? '(started failing)'
                                : '(last change)'
                              : '(first run)'}
                          </span>
                        </>
                      ) : (
                        <span className="text-slate-400">—</span>
                      )}
                    </td>
                    <td className="py-2 pr-3">
                      {c.lastRunId ? (
                        <Link
                          className="hover:underline"
                          href={`/w/${workspace}/runs/${c.lastRunId}`}
                          title={c.lastAt ? formatDateTime(c.lastAt) : undefined}
                        >
                          {c.lastBuildKey} · {c.lastAt ? formatAgo(c.lastAt) : ''}
                        </Link>
                      ) : (
                        <span className="text-slate-400">no run on this branch</span>
                      )}
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        )}
      </Card>

      <Card title="Builds">
        {view.builds.length === 0 ? (
          <p className="text-sm text-slate-500">No builds yet.</p>
        ) : (
          <table className="w-full text-left text-sm" data-testid="project-builds">
            <thead className="text-xs uppercase tracking-wide text-slate-500">
              <tr>
                <th scope="col" className="py-2 pr-3">
                  Verdict
                </th>
                <th scope="col" className="py-2 pr-3">
                  Build
                </th>
                <th scope="col" className="py-2 pr-3">
                  Branch · commit
                </th>
                <th scope="col" className="py-2 pr-3">
                  Cases failing
                </th>
                <th scope="col" className="py-2">
                  When
                </th>
              </tr>
            </thead>
            <tbody className="divide-y divide-slate-100 dark:divide-slate-800">
              {view.builds.map((b) => (
                <tr key={b.key}>
                  <td className="py-2 pr-3">
                    <VerdictBadge verdict={b.verdict} />
                  </td>
                  <td className="py-2 pr-3 font-mono">
                    <Link
                      className="text-sky-700 hover:underline dark:text-sky-400"
                      href={`${base}/builds/${encodeURIComponent(b.key)}`}
                    >
                      {b.key}
                    </Link>
                  </td>
                  <td className="py-2 pr-3">
                    {b.branch} · <span className="font-mono">{shortCommit(b.commit)}</span>
                  </td>
                  <td className="py-2 pr-3 tabular-nums">
                    {b.casesFailing} / {b.casesTotal}
                  </td>
                  <td className="py-2" title={formatDateTime(b.startedAt)}>
                    {formatAgo(b.startedAt)}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
        <Pager page={view.page} hasNext={view.hasMore} href={(p) => `${base}?page=${p}`} label="Build pages" />
      </Card>
    </div>
  );
}
