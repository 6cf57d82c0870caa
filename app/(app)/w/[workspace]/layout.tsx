import Link from 'next/link';
import type { ReactNode } from 'react';
import { Providers } from '@/src/components/shell/providers';
import { ThemeToggle } from '@/src/components/shell/theme-toggle';
import { WorkspaceNav } from '@/src/components/shell/workspace-nav';
import { listMyWorkspaces, requireMember } from '@/src/server/auth/session';
import { signOutAction } from '../../actions';

/** Every page of a workspace: membership is checked here and again by each page and action. */
export default async function WorkspaceLayout({
  children,
  params,
}: {
  children: ReactNode;
  params: Promise<{ workspace: string }>;
}) {
  const { workspace } = await params;
  const ctx = await requireMember(workspace);
  const workspaces = await listMyWorkspaces(ctx.user);
  return (
    <Providers>
      <header className="border-b border-slate-200 bg-white dark:border-slate-800 dark:bg-slate-900">
        <div className="mx-auto flex max-w-7xl flex-wrap items-center gap-x-6 gap-y-2 px-4 py-2">
          <Link href={`/w/${ctx.workspace.slug}`} className="font-semibold tracking-tight">
            Varigate
          </Link>
          <details className="relative">
            <summary
              className="cursor-pointer list-none rounded-md px-2 py-1 text-sm hover:bg-slate-100 dark:hover:bg-slate-800"
              aria-label="Switch workspace"
            >
              {ctx.workspace.name} <span aria-hidden>▾</span>
            </summary>
            <ul className="absolute z-20 mt-1 min-w-56 rounded-md border border-slate-200 bg-white py-1 shadow-lg dark:border-slate-700 dark:bg-slate-900">
              {workspaces.map((w) => (
                <li key={w.workspaceId}>
                  <Link
                    href={`/w/${w.slug}`}
                    className="block px-3 py-1.5 text-sm hover:bg-slate-100 dark:hover:bg-slate-800"
                    aria-current={w.slug === ctx.workspace.slug ? 'page' : undefined}
                  >
                    {w.name} <span className="text-xs text-slate-500">{w.role}</span>
                  </Link>
                </li>
              ))}
            </ul>
          </details>
          <WorkspaceNav workspace={ctx.workspace.slug} role={ctx.role} />
          <div className="ml-auto flex items-center gap-3 text-sm">
            <ThemeToggle />
            <span className="text-slate-500" data-testid="signed-in-as">
              {ctx.user.email} · {ctx.role}
            </span>
            <form action={signOutAction}>
              <button type="submit" className="rounded-md px-2 py-1 hover:bg-slate-100 dark:hover:bg-slate-800">
                Sign out
              </button>
            </form>
          </div>
        </div>
      </header>
      <div className="mx-auto max-w-7xl px-4 py-6">{children}</div>
    </Providers>
  );
}
