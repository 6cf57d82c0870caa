import type { Metadata } from 'next';
import { SettingsHeader } from '@/src/components/settings/settings-header';
import { TokenCreateForm } from '@/src/components/settings/token-create-form';
import { TokenTable } from '@/src/components/settings/token-table';
import { formatDateTime } from '@/src/components/settings/format';
import { requireMember } from '@/src/server/auth/session';
import { loadTokensView } from '@/src/server/services/tokens';
import { createTokenAction, revokeTokenAction } from './actions';

export const metadata: Metadata = { title: 'CI tokens' };
export const dynamic = 'force-dynamic';

/** Maintainers and admins only: a viewer gets the same 404 as a stranger. */
export default async function TokensPage({ params }: { params: Promise<{ workspace: string }> }) {
  const { workspace } = await params;
  const ctx = await requireMember(workspace, 'maintainer');
  const view = await loadTokensView(ctx);
  const tokens = view.tokens.map((t) => ({
    id: t.id,
    name: t.name,
    prefix: t.prefix,
    project: t.projectSlug,
    createdBy: t.createdByEmail,
    created: formatDateTime(t.createdAt),
    lastUsed: t.lastUsedAt ? formatDateTime(t.lastUsedAt) : 'never',
    revoked: t.revokedAt ? formatDateTime(t.revokedAt) : null,
  }));
  return (
    <div className="space-y-6">
      <SettingsHeader title="CI tokens">
        A token lets one CI job upload runs to one project and read that project&apos;s builds and runs, nothing else.
        Its secret is shown once, when it is made; keep it in the CI&apos;s secret store.
      </SettingsHeader>
      <TokenCreateForm workspace={ctx.workspace.slug} projects={view.projects} action={createTokenAction} />
      <TokenTable workspace={ctx.workspace.slug} tokens={tokens} revoke={revokeTokenAction} />
    </div>
  );
}
