'use client';

import Link from 'next/link';
import { usePathname } from 'next/navigation';

export type WorkspaceNavProps = { workspace: string; role: 'admin' | 'maintainer' | 'viewer' };

/** The workspace's sections; settings a role cannot use are not shown (the server refuses them anyway). */
export function WorkspaceNav({ workspace, role }: WorkspaceNavProps) {
  const path = usePathname();
  const base = `/w/${workspace}`;
  const items = [
    { href: base, label: 'Overview', exact: true },
    ...(role !== 'viewer' ? [{ href: `${base}/upload`, label: 'Upload' }] : []),
    { href: `${base}/settings/notifications`, label: 'Notifications' },
    ...(role !== 'viewer' ? [{ href: `${base}/settings/tokens`, label: 'CI tokens' }] : []),
    { href: `${base}/settings/members`, label: 'Members' },
    ...(role === 'admin' ? [{ href: `${base}/settings/audit`, label: 'Audit log' }] : []),
  ];
  return (
    <nav aria-label="Workspace" className="flex flex-wrap gap-1 text-sm">
      {items.map((item) => {
        const active = item.exact ? path === item.href : path.startsWith(item.href);
        return (
          <Link
            key={item.href}
            href={item.href}
            aria-current={active ? 'page' : undefined}
            className={`rounded-md px-2 py-1 ${active ? 'bg-slate-100 font-medium dark:bg-slate-800' : 'text-slate-600 hover:bg-slate-100 dark:text-slate-300 dark:hover:bg-slate-800'}`}
          >
            {item.label}
          </Link>
        );
      })}
    </nav>
  );
}
