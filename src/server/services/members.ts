import 'server-only';
import { transaction, type Executor } from '@/db/client';
import { roleAtLeast, type Role } from '../auth/roles';
import type { MemberContext } from '../auth/session';
import { AppError } from '../errors';
import { logger } from '../logger';
import { insertAuditEvent, listAuditEvents, type AuditPage } from '../queries/audit';
import {
  countAdmins,
  deleteMembership,
  getInvitationById,
  getMember,
  getUserByEmail,
  listMembers,
  listPendingInvitationRows,
  lockWorkspaceMembers,
  normaliseEmail,
  revokeInvitation,
  revokePendingInvitationsFor,
  setMemberRole,
  type MemberRow,
  type PendingInvitationRow,
} from '../queries/users';
import { inviteMember } from './accounts';

/**
 * Who belongs to a workspace and with which role. Every change runs in one transaction that
 * first locks the workspace's member list, then checks again that the actor is still an admin
 * and that the workspace keeps at least one admin, then writes the change and its audit event.
 * The page hides controls, but these checks are the ones that count.
 */

export interface MembersView {
  members: MemberRow[];
  /** Only for admins: the addresses of people not (yet) in the workspace are theirs to see. */
  invitations: PendingInvitationRow[];
}

export async function loadMembersView(ctx: MemberContext): Promise<MembersView> {
  const workspaceId = ctx.workspace.id;
  const [members, invitations] = await Promise.all([
    listMembers({ workspaceId }),
    ctx.role === 'admin' ? listPendingInvitationRows({ workspaceId }) : Promise.resolve([]),
  ]);
  return { members, invitations };
}

/** Under the workspace lock: the actor must still be an admin (they may have been demoted since the request began). */
async function lockAsAdmin(ctx: MemberContext, tx: Executor): Promise<void> {
  await lockWorkspaceMembers({ workspaceId: ctx.workspace.id }, tx);
  const actor = await getMember({ workspaceId: ctx.workspace.id, userId: ctx.user.id }, tx);
  if (!actor || !roleAtLeast(actor.role, 'admin')) {
    throw new AppError('forbidden:role', 'Only admins of this workspace manage its members.');
  }
}

async function requireMemberRow(ctx: MemberContext, userId: string, tx: Executor): Promise<MemberRow> {
  const member = await getMember({ workspaceId: ctx.workspace.id, userId }, tx);
  if (!member) throw new AppError('not_found:member', 'This person is not a member of the workspace.');
  return member;
}

/** Refuses a change that would leave the workspace without an admin. */
async function keepAnAdmin(ctx: MemberContext, member: MemberRow, tx: Executor): Promise<void> {
  if (member.role !== 'admin') return;
  if ((await countAdmins({ workspaceId: ctx.workspace.id }, tx)) <= 1) {
    throw new AppError(
      'conflict:last_admin',
      `${member.email} is the last admin of ${ctx.workspace.name}; make someone else admin first.`,
    );
  }
}

export async function changeMemberRole(
  ctx: MemberContext,
  input: { userId: string; role: Role },
): Promise<{ changed: boolean }> {
  return transaction(async (tx) => {
    await lockAsAdmin(ctx, tx);
    const member = await requireMemberRow(ctx, input.userId, tx);
    if (member.role === input.role) return { changed: false };
    if (input.role !== 'admin') await keepAnAdmin(ctx, member, tx);
    await setMemberRole({ workspaceId: ctx.workspace.id, userId: member.userId, role: input.role }, tx);
    await insertAuditEvent(
      {
        workspaceId: ctx.workspace.id,
        actorUserId: ctx.user.id,
        action: 'member.role',
        targetType: 'user',
        targetId: member.userId,
        details: { email: member.email, from: member.role, to: input.role },
      },
      tx,
    );
    return { changed: true };
  });
}

export async function removeMember(ctx: MemberContext, input: { userId: string }): Promise<{ email: string }> {
  return transaction(async (tx) => {
    await lockAsAdmin(ctx, tx);
    const member = await requireMemberRow(ctx, input.userId, tx);
    await keepAnAdmin(ctx, member, tx);
    await deleteMembership({ workspaceId: ctx.workspace.id, userId: member.userId }, tx);
    await insertAuditEvent(
      {
        workspaceId: ctx.workspace.id,
        actorUserId: ctx.user.id,
        action: 'member.remove',
        targetType: 'user',
        targetId: member.userId,
        details: { email: member.email, role: member.role },
      },
      tx,
    );
    return { email: member.email };
  });
}

/**
 * Invites an address with a role. A member is not invited again (their role is changed in the
 * list instead, and accepting would silently overwrite it); an earlier unused invitation of the
 * same address is revoked, so only the newest link works.
 */
export async function inviteToWorkspace(
  ctx: MemberContext,
  input: { email: string; role: Role },
): Promise<{ id: string; email: string }> {
  const email = normaliseEmail(input.email);
  await transaction(async (tx) => {
    await lockAsAdmin(ctx, tx);
    const existing = await getUserByEmail({ email });
    if (existing && (await getMember({ workspaceId: ctx.workspace.id, userId: existing.id }, tx))) {
      throw new AppError('conflict:member', `${email} is already a member of ${ctx.workspace.name}.`);
    }
    const replaced = await revokePendingInvitationsFor({ workspaceId: ctx.workspace.id, email }, tx);
    for (const id of replaced) {
      await insertAuditEvent(
        {
          workspaceId: ctx.workspace.id,
          actorUserId: ctx.user.id,
          action: 'invitation.revoke',
          targetType: 'invitation',
          targetId: id,
          details: { email, reason: 'replaced' },
        },
        tx,
      );
    }
  });
  // inviteMember writes the invitation and its audit event, then sends the mail.
  try {
    const { id } = await inviteMember({
      workspaceId: ctx.workspace.id,
      workspaceName: ctx.workspace.name,
      email,
      role: input.role,
      invitedBy: { id: ctx.user.id, email: ctx.user.email },
    });
    return { id, email };
  } catch (err) {
    if (err instanceof AppError) throw err;
    // The link exists but nobody received it; inviting again replaces it.
    logger.error({ err, workspaceId: ctx.workspace.id }, 'invitation mail not sent');
    throw new AppError('unavailable:mail', `The invitation mail to ${email} could not be sent. Try again in a moment.`);
  }
}

export async function revokeWorkspaceInvitation(
  ctx: MemberContext,
  input: { invitationId: string },
): Promise<{ email: string }> {
  return transaction(async (tx) => {
    await lockAsAdmin(ctx, tx);
    const invitation = await getInvitationById({ workspaceId: ctx.workspace.id, id: input.invitationId }, tx);
    // Another workspace's invitation is "not found" here, exactly like a made-up id.
    if (!invitation) throw new AppError('not_found:invitation', 'No such invitation in this workspace.');
    if (!(await revokeInvitation({ workspaceId: ctx.workspace.id, id: invitation.id }, tx))) {
      throw new AppError(
        'conflict:invitation',
        `The invitation for ${invitation.email} was already accepted or revoked.`,
      );
    }
    await insertAuditEvent(
      {
        workspaceId: ctx.workspace.id,
        actorUserId: ctx.user.id,
        action: 'invitation.revoke',
        targetType: 'invitation',
        targetId: invitation.id,
        details: { email: invitation.email, role: invitation.role },
      },
      tx,
    );
    return { email: invitation.email };
  });
}

/** One page of the workspace's audit log; admins only, like the page that shows it. */
export async function listAuditPage(ctx: MemberContext, input: { before?: number; limit: number }): Promise<AuditPage> {
  if (!roleAtLeast(ctx.role, 'admin')) throw new AppError('forbidden:role', 'Only admins read the audit log.');
  return listAuditEvents({ workspaceId: ctx.workspace.id, before: input.before, limit: input.limit });
}
