import 'server-only';
import { and, count, eq, gt } from 'drizzle-orm';
import { getDb, transaction } from '@/db/client';
import { signInTokens } from '@/db/schema';
import { hashLinkSecret, LINK_SECRET_PATTERN, newLinkSecret } from '../auth/one-time';
import { hashPassword, passwordProblem } from '../auth/password';
import type { Role } from '../auth/roles';
import { AppError } from '../errors';
import { insertAuditEvent } from '../queries/audit';
import {
  consumeSignInToken,
  getLiveInvitationByHash,
  getMembershipById,
  getUserByEmail,
  insertInvitation,
  insertSignInToken,
  insertUser,
  markInvitationAccepted,
  normaliseEmail,
  setUserPassword,
  upsertMembership,
} from '../queries/users';
import { sendInvitation, sendPasswordReset, sendSignInLink } from './account-mail';

const SIGN_IN_LINK_TTL_MS = 15 * 60 * 1000;
const RESET_LINK_TTL_MS = 60 * 60 * 1000;
export const INVITATION_TTL_MS = 7 * 24 * 3600 * 1000;
/** At most this many links per address in 15 minutes, so the form cannot be used to flood a mailbox. */
const MAX_LINKS_PER_WINDOW = 5;

async function linksRecentlySent(email: string): Promise<number> {
  const [row] = await getDb()
    .select({ n: count() })
    .from(signInTokens)
    .where(and(eq(signInTokens.email, email), gt(signInTokens.createdAt, new Date(Date.now() - SIGN_IN_LINK_TTL_MS))));
  return row?.n ?? 0;
}

/**
 * Mails a one-time link (sign-in or password reset) when the account exists. The answer is the
 * same either way, so the forms do not reveal who has an account.
 */
async function mailOneTimeLink(
  rawEmail: string,
  purpose: 'sign-in' | 'reset',
  ttlMs: number,
  send: (to: string, secret: string) => Promise<void>,
): Promise<void> {
  const email = normaliseEmail(rawEmail);
  const user = await getUserByEmail({ email });
  if (!user || (await linksRecentlySent(email)) >= MAX_LINKS_PER_WINDOW) return;
  const { secret, hash } = newLinkSecret();
  await insertSignInToken({
    email,
    userId: user.id,
    purpose,
    tokenHash: hash,
    expiresAt: new Date(Date.now() + ttlMs),
  });
  await send(email, secret);
}

export function requestSignInLink(rawEmail: string): Promise<void> {
  return mailOneTimeLink(rawEmail, 'sign-in', SIGN_IN_LINK_TTL_MS, sendSignInLink);
}

export function requestPasswordReset(rawEmail: string): Promise<void> {
  return mailOneTimeLink(rawEmail, 'reset', RESET_LINK_TTL_MS, sendPasswordReset);
}

/** Sets a new password from a reset link. A refused password rolls back, so the link stays usable for a second try. */
export async function resetPassword(secret: string, password: string): Promise<{ email: string }> {
  if (!LINK_SECRET_PATTERN.test(secret)) throw new AppError('invalid:link', 'This reset link is not valid.');
  return transaction(async (tx) => {
    const token = await consumeSignInToken({ tokenHash: hashLinkSecret(secret), purpose: 'reset' }, tx);
    if (!token?.userId)
      throw new AppError('invalid:link', 'This reset link has expired or was already used; ask for a new one.');
    const problem = passwordProblem(password, token.email);
    if (problem) throw new AppError('invalid:password', problem);
    await setUserPassword({ id: token.userId, passwordHash: await hashPassword(password) }, tx);
    return { email: token.email };
  });
}

export async function inviteMember(input: {
  workspaceId: string;
  workspaceName: string;
  email: string;
  role: Role;
  invitedBy: { id: string; email: string };
}): Promise<{ id: string }> {
  const { secret, hash } = newLinkSecret();
  const invitation = await insertInvitation({
    workspaceId: input.workspaceId,
    email: input.email,
    role: input.role,
    tokenHash: hash,
    invitedBy: input.invitedBy.id,
    expiresAt: new Date(Date.now() + INVITATION_TTL_MS),
  });
  await insertAuditEvent({
    workspaceId: input.workspaceId,
    actorUserId: input.invitedBy.id,
    action: 'member.invite',
    targetType: 'invitation',
    targetId: invitation.id,
    details: { email: invitation.email, role: input.role },
  });
  await sendInvitation({
    to: invitation.email,
    secret,
    workspaceId: input.workspaceId,
    workspaceName: input.workspaceName,
    role: input.role,
    invitedBy: input.invitedBy.email,
  });
  return { id: invitation.id };
}

export async function describeInvitation(secret: string) {
  if (!LINK_SECRET_PATTERN.test(secret)) return undefined;
  return getLiveInvitationByHash({ tokenHash: hashLinkSecret(secret) });
}

/**
 * Accepts an invitation: for the signed-in user whose address it was sent to, or by creating the
 * account (name and password) on first use. Works once; expired links are refused.
 */
export async function acceptInvitation(
  secret: string,
  who: { userId: string; email: string } | { newAccount: { name: string; password: string } },
): Promise<{ workspaceSlug: string; email: string }> {
  const found = await describeInvitation(secret);
  if (!found) throw new AppError('invalid:invitation', 'This invitation has expired, was revoked or was already used.');
  const { invitation, workspaceSlug } = found;
  if ('userId' in who && who.email !== invitation.email) {
    throw new AppError(
      'forbidden:invitation',
      `This invitation is for ${invitation.email}; you are signed in as ${who.email}.`,
    );
  }
  if ('newAccount' in who) {
    const problem = passwordProblem(who.newAccount.password, invitation.email);
    if (problem) throw new AppError('invalid:password', problem);
    if (await getUserByEmail({ email: invitation.email })) {
      throw new AppError(
        'conflict:account',
        `An account for ${invitation.email} exists already: sign in, then open the invitation again.`,
      );
    }
  }
  const passwordHash = 'newAccount' in who ? await hashPassword(who.newAccount.password) : null;
  await transaction(async (tx) => {
    if (!(await markInvitationAccepted({ id: invitation.id }, tx))) {
      throw new AppError('invalid:invitation', 'This invitation was used a moment ago.');
    }
    const userId =
      'userId' in who
        ? who.userId
        : (
            await insertUser(
              { email: invitation.email, name: who.newAccount.name, passwordHash, emailVerified: true },
              tx,
            )
          ).id;
    // Someone who joined meanwhile keeps the role they have: an old link never demotes anyone.
    if (!(await getMembershipById({ userId, workspaceId: invitation.workspaceId }, tx))) {
      await upsertMembership({ workspaceId: invitation.workspaceId, userId, role: invitation.role }, tx);
    }
    await insertAuditEvent(
      {
        workspaceId: invitation.workspaceId,
        actorUserId: userId,
        action: 'member.join',
        targetType: 'user',
        targetId: userId,
        details: { role: invitation.role },
      },
      tx,
    );
  });
  return { workspaceSlug, email: invitation.email };
}
