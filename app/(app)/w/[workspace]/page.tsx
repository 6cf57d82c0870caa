import type { Metadata } from 'next';
import Link from 'next/link';
import { Card } from '@/src/components/ui/card';
import { Pager } from '@/src/components/ui/pager';
import { VerdictBadge } from '@/src/components/ui/verdict-badge';
import { formatAgo, formatDateTime, shortCommit } from '@/src/lib/format';
import { overviewQuerySchema, type OverviewQuery } from '@/src/schemas/overview';
import { requireMember } from '@/src/server/auth/session';
import { getOverview } from '@/src/server/services/views';

export const metadata: Metadata = { title: 'Overview' };
export const dynamic = 'force-dynamic';

type SearchParams = Promise<Record<string, string | string[] | undefined>>;

function queryString(q: OverviewQuery, page: number): string {
  const params = new URLSearchParams();
  if (q.project) params.set('project', q.project);
  if (q.branch) params.set('branch', q.branch);
  if (q.verdict !== 'problems') params.set('verdict', q.verdict);
  if (q.from) params.set('from', q.from.toISOString().slice(0, 10));
  if (q.to) params.set('to', q.to.toISOString().slice(0, 10));
  if (q.sort !== 'newest') params.set('sort', q.sort);
  if (page > 1) params.set('page', String(page));
  const s = params.toString();
  return s ? `?${s}` : '';
}

const selectClass =
  'mt-1 block rounded-md border border-slate-300 bg-white px-2 py-1 text-sm dark:border-slate-700 dark:bg-slate-900';

/** Home of a workspace: the builds that need attention, newest first. */
export default async function OverviewPage({
  params,
  searchParams,
}: {
  params: Promise<{ workspace: string }>;
  searchParams: SearchParams;
}) {
  const { workspace } = await params;
  const ctx = await requireMember(workspace);
  const raw = await searchParams;
  const query = overviewQuerySchema.parse(
    Object.fromEntries(Object.entries(raw).map(([k, v]) => [k, Array.isArray(v) ? v[0] : v])),
  );
  const data = await getOverview(ctx, query);
  const base = `/w/${workspace}`;
  const filtered = query.project || query.branch || query.from || query.to || query.verdict !== 'problems';

  return (
    <div className="space-y-6">
      <div className="flex flex-wrap items-end justify-between gap-4">
        <div>
          <h1 className="text-2xl font-semibold">Builds needing attention</h1>
          <p className="mt-1 text-sm text-slate-500">
            {data.counts.projects} projects · {data.counts.builds} builds · {data.counts.failingBuilds7d} failing in the
            last 7 days
          </p>
        </div>
        <nav aria-label="Projects" className="flex flex-wrap gap-2 text-sm">
          {data.projects.map((p) => (
            <Link
              key={p.slug}
              href={`${base}/projects/${p.slug}`}
              className="rounded-md border border-slate-300 px-2 py-1 hover:bg-slate-50 dark:border-slate-700 dark:hover:bg-slate-800"
            >
              {p.name}
            </Link>
          ))}
        </nav>
      </div>

      <form method="get" className="flex flex-wrap items-end gap-3 text-sm" aria-label="Filter builds">
        <label>
          Project
          <select name="project" defaultValue={query.project ?? ''} className={selectClass}>
            <option value="">All projects</option>
            {data.projects.map((p) => (
              <option key={p.slug} value={p.slug}>
                {p.name}
              </option>
            ))}
          </select>
        </label>
        <label>
          Branch
          <select name="branch" defaultValue={query.branch ?? ''} className={selectClass}>
            <option value="">All branches</option>
            {data.branches.map((b) => (
              <option key={b} value={b}>
                {b}
              </option>
            ))}
          </select>
        </label>
        <label>
          Verdict
          <select name="verdict" defaultValue={query.verdict} className={selectClass}>
            <option value="problems">fail, warn or error</option>
            <option value="fail">fail</option>
            <option value="warn">warn</option>
            <option value="error">error</option>
            <option value="pass">pass</option>
            <option value="all">any</option>
          </select>
        </label>
        <label>
          From
          <input
            type="date"
            name="from"
            defaultValue={query.from?.toISOString().slice(0, 10)}
            className={selectClass}
          />
        </label>
        <label>
          Before
          <input type="date" name="to" defaultValue={query.to?.toISOString().slice(0, 10)} className={selectClass} />
        </label>
        <label>
          Order
          <select name="sort" defaultValue={query.sort} className={selectClass}>
            <option value="newest">newest first</option>
            <option value="oldest">oldest first</option>
          </select>
        </label>
        <button
          type="submit"
          className="rounded-md bg-slate-900 px-3 py-1.5 font-medium text-white dark:bg-slate-100 dark:text-slate-900"
        >
          Apply
        </button>
        {filtered ? (
          <Link href={base} className="py-1.5 text-sky-700 hover:underline dark:text-sky-400">
            Clear filters
          </Link>
        ) : null}
      </form>

      <Card>
        {data.rows.length === 0 ? (
          <p className="py-6 text-center text-slate-500" data-testid="overview-empty">
            {data.counts.builds === 0
              ? 'No builds yet. Point a CI job at the upload API (see the CI tokens page) or upload a file by hand.'
              : filtered
                ? 'No build matches these filters.'
                : 'Nothing needs attention: no failing or warning builds.'}
          </p>
        ) : (
          <div className="overflow-x-auto">
            <table className="w-full text-left text-sm" data-testid="overview-builds">
              <caption className="sr-only">Builds, {query.sort === 'newest' ? 'newest' : 'oldest'} first</caption>
              <thead className="text-xs uppercase tracking-wide text-slate-500">
                <tr>
                  <th scope="col" className="py-2 pr-3">
                    Verdict
                  </th>
                  <th scope="col" className="py-2 pr-3">
                    Project
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
                  <th scope="col" className="py-2 pr-3">
                    Worst finding
                  </th>
                  <th scope="col" className="py-2">
                    When
                  </th>
                </tr>
              </thead>
              <tbody className="divide-y divide-slate-100 dark:divide-slate-800">
                {data.rows.map((b) => (
                  <tr key={b.buildId} className="align-top">
                    <td className="py-2 pr-3">
                      <VerdictBadge verdict={b.verdict} />
                    </td>
                    <td className="py-2 pr-3">
                      <Link className="hover:underline" href={`${base}/projects/${b.projectSlug}`}>
                        {b.projectName}
                      </Link>
                    </td>
                    <td className="py-2 pr-3 font-mono">
                      <Link
                        className="text-sky-700 hover:underline dark:text-sky-400"
                        href={`${base}/projects/${b.projectSlug}/builds/${encodeURIComponent(b.key)}`}
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
                    <td className="max-w-md py-2 pr-3">
                      {b.worstFinding && b.worstRunId ? (
                        <Link className="hover:underline" href={`${base}/runs/${b.worstRunId}`}>
                          {b.worstFinding}
                        </Link>
                      ) : (
                        <span className="text-slate-400">—</span>
                      )}
                    </td>
                    <td className="whitespace-nowrap py-2" title={formatDateTime(b.startedAt)}>
                      {formatAgo(b.startedAt)}
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        )}
        <Pager
          page={query.page}
          hasNext={query.page * data.pageSize < data.total}
          href={(p) => `${base}${queryString(query, p)}`}
          label="Build pages"
        />
      </Card>
      <p className="text-xs text-slate-500">
        Verdicts say whether the snapshots show spurious oscillation, bound violations or drift under each case&apos;s
        policy. A pass does not validate the physics or the accuracy of a solver.
      </p>
    </div>
  );
}
