import type { Metadata } from 'next';
import { notFound } from 'next/navigation';
import { AcceptBaselinePanel } from '@/src/components/baseline/accept-baseline';
import { RunDownloads } from '@/src/components/run/run-downloads';
import { RunExplorer } from '@/src/components/run/run-explorer';
import { RunHeader } from '@/src/components/run/run-header';
import { RunNotes } from '@/src/components/run/run-notes';
import { RunWaiting } from '@/src/components/run/run-waiting';
import { Card } from '@/src/components/ui/card';
import { Notice } from '@/src/components/ui/notice';
import { initialSelection } from '@/src/lib/run-selection';
import { runIdSchema } from '@/src/schemas/runs';
import { roleAtLeast } from '@/src/server/auth/roles';
import { requireMember } from '@/src/server/auth/session';
import { getRunNotes } from '@/src/server/services/run-notes';
import { getRunPage } from '@/src/server/services/run-page';

export const metadata: Metadata = { title: 'Run' };
export const dynamic = 'force-dynamic';

type RunPageProps = {
  params: Promise<{ workspace: string; run: string }>;
  searchParams: Promise<Record<string, string | string[] | undefined>>;
};

/** One run: its verdict, findings, metric charts and the field at any step. */
export default async function RunPage({ params, searchParams }: RunPageProps) {
  const { workspace, run: runId } = await params;
  const ctx = await requireMember(workspace);
  // A malformed id is a missing run, not a database error.
  if (!runIdSchema.safeParse(runId).success) notFound();
  const data = await getRunPage({ workspaceId: ctx.workspace.id, workspaceSlug: ctx.workspace.slug, runId });
  if (!data) notFound();
  const notes = await getRunNotes(ctx.workspace.id, runId);
  const selection = initialSelection(data.variables, data.findings, await searchParams);
  const { run } = data;
  const waiting = run.status === 'queued' || run.status === 'analysing';

  return (
    <div className="space-y-6">
      <div className="flex flex-wrap items-start justify-between gap-4">
        <RunHeader data={data} />
        {!waiting ? <RunDownloads runId={run.id} hasMetrics={data.variables.length > 0} /> : null}
      </div>

      {waiting ? <RunWaiting runId={run.id} status={run.status as 'queued' | 'analysing'} /> : null}

      {run.status === 'error' ? (
        <div data-testid="run-error">
          <Notice tone="error">
            <p className="font-semibold">This upload could not be read, so nothing was judged.</p>
            <p className="mt-1 whitespace-pre-wrap break-words font-mono text-[13px]">
              {run.errorMessage ?? 'No message was recorded.'}
            </p>
            <p className="mt-2">Fix the file or its manifest and upload it again; the raw file is linked above.</p>
          </Notice>
        </div>
      ) : null}

      {run.status === 'done' && selection ? <RunExplorer data={data} initial={selection} /> : null}
      {run.status === 'done' ? (
        <AcceptBaselinePanel
          workspace={ctx.workspace.slug}
          project={data.project.slug}
          caseName={data.caseName}
          runId={run.id}
          branch={data.build.branch}
          canAccept={roleAtLeast(ctx.role, 'maintainer')}
        />
      ) : null}
      {run.status === 'done' && !selection ? (
        <Card>
          <p className="text-sm text-slate-600 dark:text-slate-400" data-testid="run-empty">
            The analysis finished but stored no variables for this run, so there is nothing to chart.
          </p>
        </Card>
      ) : null}

      <RunNotes workspace={ctx.workspace.slug} runId={run.id} notes={notes} />

      <p className="max-w-3xl text-xs text-slate-500 dark:text-slate-400" data-testid="checks-note">
        {data.note}
      </p>
    </div>
  );
}
