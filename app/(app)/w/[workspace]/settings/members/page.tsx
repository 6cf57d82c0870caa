import type { Metadata } from 'next';
import { InvitationList } from '@/src/components/settings/invitation-list';
import { InviteForm } from '@/src/components/settings/invite-form';
import { MemberTable } from '@/src/components/settings/member-table';
import { RoleGuide } from '@/src/components/settings/role-guide';
import { SettingsHeader } from '@/src/components/settings/settings-header';
import { formatDate, formatDateTime } from '@/src/components/settings/format';
import { ROLE_DESCRIPTIONS } from '@/src/server/auth/roles';
import { requireMember } from '@/src/server/auth/session';
import { loadMembersView } from '@/src/server/services/members';
import { changeRoleAction, inviteMemberAction, removeMemberAction, revokeInvitationAction } from './actions';

export const metadata: Metadata = { title: 'Members' };
export const dynamic = 'force-dynamic';

/** Every member sees who is in the workspace; only admins get the controls (and the actions check again). */
export default async function MembersPage({ params }: { params: Promise<{ workspace: string }> }) {
  const { workspace } = await params;
  const ctx = await requireMember(workspace);
  const view = await loadMembersView(ctx);
  const isAdmin = ctx.role === 'admin';
  const members = view.members.map((m) => ({
    userId: m.userId,
    name: m.name,
    email: m.email,
    role: m.role,
    joined: formatDate(m.joinedAt),
  }));
  const invitations = view.invitations.map((i) => ({
    id: i.id,
    email: i.email,
    role: i.role,
    invitedBy: i.invitedByEmail,
    sent: formatDateTime(i.createdAt),
    expires: formatDateTime(i.expiresAt),
  }));
  return (
    <div className="space-y-6">
      <SettingsHeader title="Members">
        {isAdmin
          ? 'Invite people, change their roles or remove them. A workspace always keeps at least one admin.'
          : 'Who is in this workspace. Only admins can invite people or change roles.'}
      </SettingsHeader>
      <MemberTable
        workspace={ctx.workspace.slug}
        members={members}
        currentUserId={ctx.user.id}
        canManage={isAdmin}
        changeRole={changeRoleAction}
        remove={removeMemberAction}
      />
      {isAdmin ? (
        <>
          <InviteForm workspace={ctx.workspace.slug} action={inviteMemberAction} roleDescriptions={ROLE_DESCRIPTIONS} />
          <InvitationList workspace={ctx.workspace.slug} invitations={invitations} revoke={revokeInvitationAction} />
        </>
      ) : null}
      <RoleGuide descriptions={ROLE_DESCRIPTIONS} current={ctx.role} />
    </div>
  );
}
