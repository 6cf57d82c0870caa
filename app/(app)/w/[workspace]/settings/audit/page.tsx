import type { Metadata } from 'next';
import { z } from 'zod';
import { AuditTable } from '@/src/components/settings/audit-table';
import { describeAuditEvent } from '@/src/components/settings/audit-text';
import { formatDateTime } from '@/src/components/settings/format';
import { SettingsHeader } from '@/src/components/settings/settings-header';
import { requireMember } from '@/src/server/auth/session';
import { listAuditPage } from '@/src/server/services/members';

export const metadata: Metadata = { title: 'Audit log' };
export const dynamic = 'force-dynamic';

const PAGE_SIZE = 50;
// A malformed cursor shows the newest page rather than an error.
const beforeSchema = z.coerce.number().int().positive().optional().catch(undefined);

function actorLabel(e: {
  actorEmail: string | null;
  actorUserId: string | null;
  actorTokenPrefix: string | null;
}): string {
  if (e.actorEmail) return e.actorEmail;
  if (e.actorTokenPrefix) return `token ${e.actorTokenPrefix}…`;
  return e.actorUserId ? 'a deleted account' : 'Varigate (command line or system)';
}

/** Admins only: who changed members, roles, tokens and baselines, and when. */
export default async function AuditPage({
  params,
  searchParams,
}: {
  params: Promise<{ workspace: string }>;
  searchParams: Promise<Record<string, string | string[] | undefined>>;
}) {
  const { workspace } = await params;
  const ctx = await requireMember(workspace, 'admin');
  const before = beforeSchema.parse((await searchParams).before);
  const page = await listAuditPage(ctx, { before, limit: PAGE_SIZE });
  const base = `/w/${ctx.workspace.slug}/settings/audit`;
  const events = page.events.map((e) => ({
    id: e.id,
    when: formatDateTime(e.createdAt),
    actor: actorLabel(e),
    action: e.action,
    summary: describeAuditEvent(e),
  }));
  return (
    <div className="space-y-6">
      <SettingsHeader title="Audit log">
        Every change to members, roles, invitations, CI tokens, policies, baselines and mailing lists in{' '}
        {ctx.workspace.name}, with who made it and when.
      </SettingsHeader>
      <AuditTable
        events={events}
        olderHref={page.nextBefore ? `${base}?before=${page.nextBefore}` : null}
        newestHref={before ? base : null}
      />
    </div>
  );
}
