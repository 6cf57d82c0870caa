import type { Metadata } from 'next';
import Link from 'next/link';
import { AcceptBaselinePanel } from '@/src/components/baseline/accept-baseline';
import { CasePolicyForm } from '@/src/components/policy/case-policy-form';
import { Card } from '@/src/components/ui/card';
import { VerdictBadge } from '@/src/components/ui/verdict-badge';
import { formatAgo, formatDateTime, shortCommit } from '@/src/lib/format';
import { policyToFormValues } from '@/src/schemas/policy-form';
import { requireMember } from '@/src/server/auth/session';
import { getCasePage, type CaseHistoryRow } from '@/src/server/services/policies';
import { previewCasePolicyAction, saveCasePolicyAction } from './actions';

export const dynamic = 'force-dynamic';

type Params = { workspace: string; project: string; case: string };

export async function generateMetadata({ params }: { params: Promise<Params> }): Promise<Metadata> {
  return { title: `Case ${decodeURIComponent((await params).case)}` };
}

function History({
  rows,
  total,
  runLink,
  buildLink,
}: {
  rows: CaseHistoryRow[];
  total: number;
  runLink: (id: string) => string;
  buildLink: (key: string) => string;
}) {
  if (rows.length === 0) {
    return (
      <p className="text-sm text-slate-500 dark:text-slate-400">
        No runs yet. A CI upload or a manual upload that names this case adds one.
      </p>
    );
  }
  return (
    <div className="overflow-x-auto">
      <table className="w-full text-left text-sm" data-testid="case-history">
        <caption className="sr-only">Recent runs of this case, newest first</caption>
        <thead className="text-xs uppercase tracking-wide text-slate-500 dark:text-slate-400">
          <tr>
            <th scope="col" className="py-2 pr-3">
              Run
            </th>
            <th scope="col" className="py-2 pr-3">
              Build
            </th>
            <th scope="col" className="py-2 pr-3">
              Branch
            </th>
            <th scope="col" className="py-2 pr-3">
              Verdict
            </th>
            <th scope="col" className="py-2">
              Worst finding
            </th>
          </tr>
        </thead>
        <tbody className="divide-y divide-slate-100 dark:divide-slate-800">
          {rows.map((r) => (
            <tr key={r.runId} className="align-top">
              <td className="py-2 pr-3 whitespace-nowrap">
                <Link
                  href={runLink(r.runId)}
                  className="text-sky-700 hover:underline dark:text-sky-400"
                  title={formatDateTime(r.createdAt)}
                >
                  {formatAgo(r.createdAt)}
                </Link>
              </td>
              <td className="py-2 pr-3">
                <Link href={buildLink(r.buildKey)} className="font-mono hover:underline">
                  {r.buildKey}
                </Link>
                <span className="block font-mono text-xs text-slate-500 dark:text-slate-400">
                  {shortCommit(r.commit)}
                </span>
              </td>
              <td className="py-2 pr-3 font-mono">{r.branch}</td>
              <td className="py-2 pr-3">
                <VerdictBadge verdict={r.verdict} status={r.status} />
              </td>
              <td className="py-2 text-slate-700 dark:text-slate-300">
                {r.status === 'error' ? r.errorMessage : (r.worstFinding ?? '—')}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
      {total > rows.length ? (
        <p className="mt-2 text-xs text-slate-500 dark:text-slate-400">
          The newest {rows.length} of {total} runs.
        </p>
      ) : null}
    </div>
  );
}

export default async function CasePage({ params }: { params: Promise<Params> }) {
  const p = await params;
  const workspace = p.workspace;
  const caseName = decodeURIComponent(p.case);
  const ctx = await requireMember(workspace);
  const view = await getCasePage(ctx, decodeURIComponent(p.project), caseName);
  const projectBase = `/w/${workspace}/projects/${encodeURIComponent(view.project.slug)}`;
  const runLink = (id: string) => `/w/${workspace}/runs/${encodeURIComponent(id)}`;
  const buildLink = (key: string) => `${projectBase}/builds/${encodeURIComponent(key)}`;
  const latest = view.latest;

  return (
    <div className="space-y-6">
      <div>
        <p className="text-sm text-slate-500 dark:text-slate-400">
          <Link href={`/w/${workspace}`} className="hover:underline">
            Overview
          </Link>{' '}
          /{' '}
          <Link href={projectBase} className="hover:underline">
            {view.project.name}
          </Link>{' '}
          / case
        </p>
        <h1 className="break-all text-2xl font-semibold">{view.kase.name}</h1>
        <p className="mt-1 text-sm text-slate-500 dark:text-slate-400">
          {view.totalRuns} run{view.totalRuns === 1 ? '' : 's'} · default branch{' '}
          <span className="font-mono">{view.project.defaultBranch}</span>
        </p>
      </div>

      <div className="grid items-start gap-6 lg:grid-cols-2">
        <Card title="Baselines">
          {view.baselines.length === 0 ? (
            <p className="text-sm text-slate-500 dark:text-slate-400">
              No baseline accepted yet: runs are judged by the policy alone.
            </p>
          ) : (
            <ul className="divide-y divide-slate-100 text-sm dark:divide-slate-800" data-testid="case-baselines">
              {view.baselines.map((b) => (
                <li key={b.branch} className="flex flex-wrap items-center gap-x-3 gap-y-1 py-2">
                  <span className="font-mono">{b.branch}</span>
                  <Link href={runLink(b.runId)} className="font-mono text-sky-700 hover:underline dark:text-sky-400">
                    {b.buildKey}
                  </Link>
                  <VerdictBadge verdict={b.verdict} />
                  <span className="text-xs text-slate-500 dark:text-slate-400">
                    accepted {formatDateTime(b.acceptedAt)}
                    {b.acceptedByEmail ? ` by ${b.acceptedByEmail}` : ''}
                  </span>
                </li>
              ))}
            </ul>
          )}
        </Card>
        <div className="space-y-6">
          <Card title="Latest analysed run">
            {latest ? (
              <p className="flex flex-wrap items-center gap-x-2 gap-y-1 text-sm" data-testid="latest-run">
                <Link href={runLink(latest.runId)} className="text-sky-700 hover:underline dark:text-sky-400">
                  Build <span className="font-mono">{latest.buildKey}</span>
                </Link>
                <span>
                  on <span className="font-mono">{latest.branch}</span>
                </span>
                <VerdictBadge verdict={latest.verdict} />
                <span className="text-xs text-slate-500 dark:text-slate-400">{formatDateTime(latest.createdAt)}</span>
              </p>
            ) : (
              <p className="text-sm text-slate-500 dark:text-slate-400">
                No analysed run yet, so there is nothing to accept as a baseline or to preview a policy on.
              </p>
            )}
          </Card>
          {latest ? (
            <AcceptBaselinePanel
              workspace={workspace}
              project={view.project.slug}
              caseName={view.kase.name}
              runId={latest.runId}
              branch={latest.branch}
              canAccept={view.canEdit}
            />
          ) : null}
        </div>
      </div>

      <Card title="History">
        <History rows={view.history} total={view.totalRuns} runLink={runLink} buildLink={buildLink} />
      </Card>

      <Card title="Policy" id="policy">
        <CasePolicyForm
          workspace={workspace}
          project={view.project.slug}
          caseName={view.kase.name}
          initialValues={policyToFormValues(view.kase.policy)}
          projectPolicy={view.project.defaultPolicy}
          readOnly={!view.canEdit}
          latestRun={
            latest
              ? { id: latest.runId, buildKey: latest.buildKey, branch: latest.branch, verdict: latest.verdict }
              : null
          }
          previewAction={previewCasePolicyAction}
          saveAction={saveCasePolicyAction}
        />
      </Card>
    </div>
  );
}
