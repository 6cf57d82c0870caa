import Link from 'next/link';
import { Card } from '@/src/components/ui/card';
import { VerdictBadge } from '@/src/components/ui/verdict-badge';
import { formatDateTime } from '@/src/lib/format';
import { roleAtLeast } from '@/src/server/auth/roles';
import { requireMember } from '@/src/server/auth/session';
import { getBaselineComparison } from '@/src/server/services/policies';
import { AcceptBaselineControl } from './accept-baseline-control';
import { compareKeyMetrics } from './key-metrics';

export type AcceptBaselinePanelProps = {
  /** Workspace slug, as in the URL. */
  workspace: string;
  /** Project slug. */
  project: string;
  caseName: string;
  runId: string;
  /** The branch whose baseline the run would become (normally the run's build's branch). */
  branch: string;
  /** Whether to offer the accept control; it is shown only when the member is also a maintainer. */
  canAccept: boolean;
};

/**
 * The case's baseline on a branch, and for maintainers the control that makes this run the
 * baseline after a confirmation showing both runs' key metrics. Server component: it loads what
 * it shows itself, so any page can embed it with the ids it already has.
 */
export async function AcceptBaselinePanel({
  workspace,
  project,
  caseName,
  runId,
  branch,
  canAccept,
}: AcceptBaselinePanelProps) {
  const member = await requireMember(workspace);
  const comparison = await getBaselineComparison(member, { projectSlug: project, caseName, runId, branch });
  if (!comparison) return null;
  const { current, run } = comparison;
  const allowed = canAccept && roleAtLeast(member.role, 'maintainer');
  const runLink = (id: string) => `/w/${workspace}/runs/${encodeURIComponent(id)}`;

  return (
    <Card title={`Baseline on ${branch}`} id="baseline">
      <div className="space-y-3 text-sm" data-testid="baseline-panel">
        {current ? (
          <p>
            {comparison.isCurrent ? 'This run is the baseline' : 'Current baseline'}
            {comparison.currentFromDefaultBranch ? ` (from ${current.branch}, as ${branch} has none)` : ''}: build{' '}
            <Link href={runLink(current.runId)} className="font-mono text-sky-700 hover:underline dark:text-sky-400">
              {current.buildKey}
            </Link>{' '}
            <VerdictBadge verdict={current.verdict} />, accepted {formatDateTime(current.acceptedAt)}
            {current.acceptedByEmail ? ` by ${current.acceptedByEmail}` : ''}.
          </p>
        ) : (
          <p>No baseline on {branch} yet: runs are judged by the policy alone.</p>
        )}
        {comparison.isCurrent ? null : run.status !== 'done' ? (
          <p className="text-slate-500 dark:text-slate-400">
            Only an analysed run can become the baseline (this one is {run.status}).
          </p>
        ) : allowed ? (
          <AcceptBaselineControl
            workspace={workspace}
            project={project}
            caseName={caseName}
            runId={runId}
            branch={branch}
            runBuildKey={run.buildKey}
            runVerdict={run.verdict}
            current={current ? { buildKey: current.buildKey, branch: current.branch, verdict: current.verdict } : null}
            rows={compareKeyMetrics(current ? current.variables : null, run.variables)}
          />
        ) : null}
      </div>
    </Card>
  );
}
