import { notFound } from 'next/navigation';
import type { ReactNode } from 'react';
import { requireMember } from '@/src/server/auth/session';
import { runPageExists } from '@/src/server/services/run-page';

/**
 * Checks the run before the page's loading state streams: a run of another workspace, or an id
 * that is not a run, must be an HTTP 404 like any missing page, not a 200 with a "not found" body.
 */
export default async function RunLayout({
  children,
  params,
}: {
  children: ReactNode;
  params: Promise<{ workspace: string; run: string }>;
}) {
  const { workspace, run } = await params;
  const ctx = await requireMember(workspace);
  if (!(await runPageExists({ workspaceId: ctx.workspace.id, runId: run }))) notFound();
  return children;
}
