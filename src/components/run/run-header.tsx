import Link from 'next/link';
import { CiLink } from '@/src/components/ui/ci-link';
import { VerdictBadge } from '@/src/components/ui/verdict-badge';
import { formatDateTime, shortCommit } from '@/src/lib/format';
import type { RunPageData } from '@/src/lib/run-views';

export type RunHeaderProps = { data: RunPageData };

const statusText: Record<string, string> = {
  queued: 'queued',
  analysing: 'analysing',
  done: 'analysed',
  error: 'could not be read',
};

/** Case, project and build of a run with its verdict, and where to go from here. */
export function RunHeader({ data }: RunHeaderProps) {
  const { run, build, project } = data;
  const projectHref = `/w/${data.workspace}/projects/${encodeURIComponent(project.slug)}`;
  const buildHref = `${projectHref}/builds/${encodeURIComponent(build.key)}`;
  const finished = run.finishedAt ? ` · finished ${formatDateTime(new Date(run.finishedAt))}` : '';
  return (
    <div>
      <nav aria-label="Breadcrumb" className="text-sm text-slate-500">
        <Link href={`/w/${data.workspace}`} className="hover:underline">
          Overview
        </Link>{' '}
        /{' '}
        <Link href={projectHref} className="hover:underline" data-testid="project-link">
          {project.name}
        </Link>{' '}
        /{' '}
        <Link href={buildHref} className="hover:underline" data-testid="build-link">
          build <span className="font-mono">{build.key}</span>
        </Link>{' '}
        / run
      </nav>
      <h1 className="mt-1 flex flex-wrap items-center gap-3 text-2xl font-semibold">
        <span className="break-all font-mono" data-testid="run-case">
          {data.caseName}
        </span>
        <VerdictBadge verdict={run.verdict} status={run.status} />
      </h1>
      <p className="mt-1 text-sm text-slate-600 dark:text-slate-400">
        {project.name} · branch <span className="font-mono">{build.branch}</span> · commit{' '}
        <span className="font-mono">{shortCommit(build.commit)}</span> · {statusText[run.status] ?? run.status}
        {finished}
        <CiLink url={build.ciUrl} />
      </p>
    </div>
  );
}
