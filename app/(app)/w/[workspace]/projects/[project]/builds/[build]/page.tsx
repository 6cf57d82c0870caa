import type { Metadata } from 'next';
import Link from 'next/link';
import { Card } from '@/src/components/ui/card';
import { CiLink } from '@/src/components/ui/ci-link';
import { VerdictBadge } from '@/src/components/ui/verdict-badge';
import { formatDateTime, shortCommit } from '@/src/lib/format';
import { requireMember } from '@/src/server/auth/session';
import { CHECKS_DO_NOT_PROVE } from '@/src/server/services/reports';
import { getBuildView } from '@/src/server/services/views';

export const metadata: Metadata = { title: 'Build' };
export const dynamic = 'force-dynamic';

export default async function BuildPage({
  params,
}: {
  params: Promise<{ workspace: string; project: string; build: string }>;
}) {
  const { workspace, project: slug, build: rawKey } = await params;
  const ctx = await requireMember(workspace);
  const view = await getBuildView(ctx, slug, decodeURIComponent(rawKey));
  const { build } = view;
  const projectBase = `/w/${workspace}/projects/${slug}`;
  const open = view.cases.some((c) => c.status === 'queued' || c.status === 'analysing');
  const failing = view.cases.filter((c) => c.verdict === 'fail' || c.verdict === 'error').length;
  const findings = view.cases.reduce(
    (acc, c) => ({ fail: acc.fail + c.failFindings, warn: acc.warn + c.warnFindings }),
    { fail: 0, warn: 0 },
  );

  return (
    <div className="space-y-6">
      <div>
        <p className="text-sm text-slate-500">
          <Link href={`/w/${workspace}`} className="hover:underline">
            Overview
          </Link>{' '}
          /{' '}
          <Link href={projectBase} className="hover:underline">
            {view.project.name}
          </Link>{' '}
          / build
        </p>
        <h1 className="mt-1 flex flex-wrap items-center gap-3 text-2xl font-semibold">
          <span className="font-mono">{build.key}</span>{' '}
          <VerdictBadge verdict={open ? null : build.verdict} status={open ? 'analysing' : undefined} />
        </h1>
        <p className="mt-1 text-sm text-slate-500">
          {build.branch} · <span className="font-mono">{shortCommit(build.commit)}</span> · started{' '}
          {formatDateTime(build.startedAt)}
          <CiLink url={build.ciUrl} />
        </p>
      </div>

      <Card title="Summary">
        <p className="text-sm" data-testid="build-summary">
          {failing} of {view.cases.length} cases failing · {findings.fail} failing and {findings.warn} warning findings
          {open ? ' · some cases are still being analysed' : ''}
        </p>
      </Card>

      <Card title="Cases">
        <div className="overflow-x-auto">
          <table className="w-full text-left text-sm" data-testid="build-cases">
            <thead className="text-xs uppercase tracking-wide text-slate-500">
              <tr>
                <th scope="col" className="py-2 pr-3">
                  Case
                </th>
                <th scope="col" className="py-2 pr-3">
                  Verdict
                </th>
                <th scope="col" className="py-2 pr-3">
                  Findings
                </th>
                <th scope="col" className="py-2">
                  Worst finding
                </th>
              </tr>
            </thead>
            <tbody className="divide-y divide-slate-100 dark:divide-slate-800">
              {view.cases.map((c) => (
                <tr key={c.runId} className="align-top">
                  <td className="py-2 pr-3">
                    <Link
                      className="text-sky-700 hover:underline dark:text-sky-400"
                      href={`/w/${workspace}/runs/${c.runId}`}
                    >
                      {c.caseName}
                    </Link>
                  </td>
                  <td className="py-2 pr-3">
                    <VerdictBadge verdict={c.verdict} status={c.status} />
                  </td>
                  <td className="py-2 pr-3 tabular-nums">
                    {c.failFindings} fail · {c.warnFindings} warn
                  </td>
                  <td className="max-w-xl py-2">
                    {c.errorMessage ?? c.worstFinding ?? <span className="text-slate-400">—</span>}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      </Card>

      <Card
        title={
          view.previous ? `Compared with the previous build on ${build.branch}` : 'Compared with the previous build'
        }
      >
        {!view.previous ? (
          <p className="text-sm text-slate-500">This is the first build on {build.branch}.</p>
        ) : view.changes.length === 0 ? (
          <p className="text-sm text-slate-500" data-testid="build-changes">
            No case changed verdict since{' '}
            <Link
              className="font-mono hover:underline"
              href={`${projectBase}/builds/${encodeURIComponent(view.previous.key)}`}
            >
              {view.previous.key}
            </Link>
            .
          </p>
        ) : (
          <div data-testid="build-changes">
            <p className="mb-2 text-sm text-slate-500">
              Since{' '}
              <Link
                className="font-mono hover:underline"
                href={`${projectBase}/builds/${encodeURIComponent(view.previous.key)}`}
              >
                {view.previous.key}
              </Link>
              :
            </p>
            <ul className="space-y-1 text-sm">
              {view.changes.map((c) => (
                <li key={c.caseName} className="flex items-center gap-2">
                  <span className="min-w-48">{c.caseName}</span>
                  <VerdictBadge verdict={c.before} /> <span aria-hidden>→</span>
                  <span className="sr-only">became</span> <VerdictBadge verdict={c.after} />
                </li>
              ))}
            </ul>
          </div>
        )}
      </Card>
      <p className="text-xs text-slate-500">{CHECKS_DO_NOT_PROVE}</p>
    </div>
  );
}
