import 'server-only';
import { and, asc, count, eq, gt, isNull, sql } from 'drizzle-orm';
import { alias } from 'drizzle-orm/pg-core';
import { getDb, type Executor } from '@/db/client';
import {
  invitations,
  memberships,
  signInAttempts,
  signInTokens,
  users,
  workspaces,
  type Invitation,
  type User,
} from '@/db/schema';
import type { Role } from '../auth/roles';

export const normaliseEmail = (email: string): string => email.trim().toLowerCase();

export async function getUserByEmail({ email }: { email: string }): Promise<User | undefined> {
  const rows = await getDb()
    .select()
    .from(users)
    .where(eq(users.email, normaliseEmail(email)))
    .limit(1);
  return rows[0];
}

export async function getUserById({ id }: { id: string }): Promise<User | undefined> {
  const rows = await getDb().select().from(users).where(eq(users.id, id)).limit(1);
  return rows[0];
}

export async function insertUser(
  input: { email: string; name?: string | null; passwordHash?: string | null; emailVerified?: boolean },
  db: Executor = getDb(),
): Promise<User> {
  const [row] = await db
    .insert(users)
    .values({
      email: normaliseEmail(input.email),
      name: input.name ?? null,
      passwordHash: input.passwordHash ?? null,
      emailVerifiedAt: input.emailVerified ? new Date() : null,
    })
    .returning();
  return row!;
}

export async function setUserPassword(
  { id, passwordHash }: { id: string; passwordHash: string },
  db: Executor = getDb(),
): Promise<void> {
  await db
    .update(users)
    // A new password voids every session issued before it: a stolen cookie dies with the reset.
    .set({
      passwordHash,
      emailVerifiedAt: sql`coalesce(${users.emailVerifiedAt}, now())`,
      sessionsValidAfter: sql`now()`,
    })
    .where(eq(users.id, id));
}

export interface WorkspaceMembership {
  workspaceId: string;
  slug: string;
  name: string;
  role: Role;
}

/** Memberships joined with their workspace, shaped as WorkspaceMembership; callers add the filter. */
function membershipsWithWorkspace(db: Executor) {
  return db
    .select({ workspaceId: workspaces.id, slug: workspaces.slug, name: workspaces.name, role: memberships.role })
    .from(memberships)
    .innerJoin(workspaces, eq(workspaces.id, memberships.workspaceId));
}

export async function listUserWorkspaces({ userId }: { userId: string }): Promise<WorkspaceMembership[]> {
  return membershipsWithWorkspace(getDb()).where(eq(memberships.userId, userId)).orderBy(asc(workspaces.name));
}

export async function getMembershipBySlug({
  userId,
  slug,
}: {
  userId: string;
  slug: string;
}): Promise<WorkspaceMembership | undefined> {
  const rows = await membershipsWithWorkspace(getDb())
    .where(and(eq(memberships.userId, userId), eq(workspaces.slug, slug)))
    .limit(1);
  return rows[0];
}

export async function getMembershipById(
  { userId, workspaceId }: { userId: string; workspaceId: string },
  db: Executor = getDb(),
): Promise<WorkspaceMembership | undefined> {
  const rows = await membershipsWithWorkspace(db)
    .where(and(eq(memberships.userId, userId), eq(memberships.workspaceId, workspaceId)))
    .limit(1);
  return rows[0];
}

export async function upsertMembership(
  { workspaceId, userId, role }: { workspaceId: string; userId: string; role: Role },
  db: Executor = getDb(),
): Promise<void> {
  await db
    .insert(memberships)
    .values({ workspaceId, userId, role })
    .onConflictDoUpdate({ target: [memberships.workspaceId, memberships.userId], set: { role } });
}

export interface MemberRow {
  userId: string;
  email: string;
  name: string | null;
  role: Role;
  joinedAt: Date;
}

export async function listMembers({ workspaceId }: { workspaceId: string }): Promise<MemberRow[]> {
  return getDb()
    .select({
      userId: users.id,
      email: users.email,
      name: users.name,
      role: memberships.role,
      joinedAt: memberships.createdAt,
    })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(eq(memberships.workspaceId, workspaceId))
    .orderBy(asc(users.email));
}

export async function countAdmins({ workspaceId }: { workspaceId: string }, db: Executor = getDb()): Promise<number> {
  const [row] = await db
    .select({ n: count() })
    .from(memberships)
    .where(and(eq(memberships.workspaceId, workspaceId), eq(memberships.role, 'admin')));
  return row?.n ?? 0;
}

export async function deleteMembership(
  { workspaceId, userId }: { workspaceId: string; userId: string },
  db: Executor = getDb(),
): Promise<boolean> {
  const rows = await db
    .delete(memberships)
    .where(and(eq(memberships.workspaceId, workspaceId), eq(memberships.userId, userId)))
    .returning({ userId: memberships.userId });
  return rows.length > 0;
}

/**
 * Locks the workspace row until the transaction ends. Every change to a workspace's members
 * takes this lock first, so two concurrent changes cannot both see "another admin is left".
 */
export async function lockWorkspaceMembers({ workspaceId }: { workspaceId: string }, db: Executor): Promise<boolean> {
  const rows = await db
    .select({ id: workspaces.id })
    .from(workspaces)
    .where(eq(workspaces.id, workspaceId))
    .for('update');
  return rows.length > 0;
}

export async function getMember(
  { workspaceId, userId }: { workspaceId: string; userId: string },
  db: Executor = getDb(),
): Promise<MemberRow | undefined> {
  const rows = await db
    .select({
      userId: users.id,
      email: users.email,
      name: users.name,
      role: memberships.role,
      joinedAt: memberships.createdAt,
    })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(and(eq(memberships.workspaceId, workspaceId), eq(memberships.userId, userId)))
    .limit(1);
  return rows[0];
}

export async function setMemberRole(
  { workspaceId, userId, role }: { workspaceId: string; userId: string; role: Role },
  db: Executor = getDb(),
): Promise<boolean> {
  const rows = await db
    .update(memberships)
    .set({ role })
    .where(and(eq(memberships.workspaceId, workspaceId), eq(memberships.userId, userId)))
    .returning({ userId: memberships.userId });
  return rows.length > 0;
}

// ------------------------------------------------------------------ one-time links

export async function insertSignInToken(input: {
  email: string;
  userId: string | null;
  purpose: 'sign-in' | 'reset';
  tokenHash: string;
  expiresAt: Date;
}): Promise<void> {
  await getDb().insert(signInTokens).values(input);
}

/** Marks a live token used and returns it; undefined when unknown, used or expired. Atomic. */
export async function consumeSignInToken(
  { tokenHash, purpose }: { tokenHash: string; purpose: 'sign-in' | 'reset' },
  db: Executor = getDb(),
) {
  const rows = await db
    .update(signInTokens)
    .set({ usedAt: new Date() })
    .where(
      and(
        eq(signInTokens.tokenHash, tokenHash),
        eq(signInTokens.purpose, purpose),
        isNull(signInTokens.usedAt),
        gt(signInTokens.expiresAt, new Date()),
      ),
    )
    .returning();
  return rows[0];
}

// ------------------------------------------------------------------ invitations

/** An invitation that can still be used: not accepted, not revoked, not expired. */
function liveInvitation() {
  return [isNull(invitations.acceptedAt), isNull(invitations.revokedAt), gt(invitations.expiresAt, new Date())];
}

export async function insertInvitation(input: {
  workspaceId: string;
  email: string;
  role: Role;
  tokenHash: string;
  invitedBy: string | null;
  expiresAt: Date;
}): Promise<Invitation> {
  const [row] = await getDb()
    .insert(invitations)
    .values({ ...input, email: normaliseEmail(input.email) })
    .returning();
  return row!;
}

export async function getLiveInvitationByHash({ tokenHash }: { tokenHash: string }) {
  const rows = await getDb()
    .select({ invitation: invitations, workspaceSlug: workspaces.slug, workspaceName: workspaces.name })
    .from(invitations)
    .innerJoin(workspaces, eq(workspaces.id, invitations.workspaceId))
    .where(and(eq(invitations.tokenHash, tokenHash), ...liveInvitation()))
    .limit(1);
  return rows[0];
}

/** Marks an invitation accepted; false when someone else used it first. */
export async function markInvitationAccepted({ id }: { id: string }, db: Executor = getDb()): Promise<boolean> {
  const rows = await db
    .update(invitations)
    .set({ acceptedAt: new Date() })
    .where(and(eq(invitations.id, id), ...liveInvitation()))
    .returning({ id: invitations.id });
  return rows.length > 0;
}

export async function revokeInvitation(
  { workspaceId, id }: { workspaceId: string; id: string },
  db: Executor = getDb(),
): Promise<boolean> {
  const rows = await db
    .update(invitations)
    .set({ revokedAt: new Date() })
    .where(
      and(
        eq(invitations.workspaceId, workspaceId),
        eq(invitations.id, id),
        isNull(invitations.acceptedAt),
        isNull(invitations.revokedAt),
      ),
    )
    .returning({ id: invitations.id });
  return rows.length > 0;
}

export interface PendingInvitationRow {
  id: string;
  email: string;
  role: Role;
  invitedByEmail: string | null;
  createdAt: Date;
  expiresAt: Date;
}

const inviter = alias(users, 'inviter');

/** Live invitations of a workspace with who sent them, oldest first. */
export async function listPendingInvitationRows({
  workspaceId,
}: {
  workspaceId: string;
}): Promise<PendingInvitationRow[]> {
  return getDb()
    .select({
      id: invitations.id,
      email: invitations.email,
      role: invitations.role,
      invitedByEmail: inviter.email,
      createdAt: invitations.createdAt,
      expiresAt: invitations.expiresAt,
    })
    .from(invitations)
    .leftJoin(inviter, eq(inviter.id, invitations.invitedBy))
    .where(and(eq(invitations.workspaceId, workspaceId), ...liveInvitation()))
    .orderBy(asc(invitations.createdAt));
}

export async function getInvitationById(
  { workspaceId, id }: { workspaceId: string; id: string },
  db: Executor = getDb(),
): Promise<Invitation | undefined> {
  const rows = await db
    .select()
    .from(invitations)
    .where(and(eq(invitations.workspaceId, workspaceId), eq(invitations.id, id)))
    .limit(1);
  return rows[0];
}

/** Revokes the unused invitations of one address (a new invitation replaces them); their ids. */
export async function revokePendingInvitationsFor(
  { workspaceId, email }: { workspaceId: string; email: string },
  db: Executor = getDb(),
): Promise<string[]> {
  const rows = await db
    .update(invitations)
    .set({ revokedAt: new Date() })
    .where(
      and(
        eq(invitations.workspaceId, workspaceId),
        eq(invitations.email, normaliseEmail(email)),
        isNull(invitations.acceptedAt),
        isNull(invitations.revokedAt),
      ),
    )
    .returning({ id: invitations.id });
  return rows.map((r) => r.id);
}

// ------------------------------------------------------------------ rate limiting

export async function recordSignInAttempt(input: { email: string; ip: string; succeeded: boolean }): Promise<void> {
  await getDb()
    .insert(signInAttempts)
    .values({ ...input, email: normaliseEmail(input.email) });
}

/** Failed attempts since `since`, for this account and for this address. */
export async function countFailedAttempts({
  email,
  ip,
  since,
}: {
  email: string;
  ip: string;
  since: Date;
}): Promise<{ byEmail: number; byIp: number }> {
  const [row] = await getDb()
    .select({
      byEmail: sql<number>`count(*) filter (where ${signInAttempts.email} = ${normaliseEmail(email)})::int`,
      byIp: sql<number>`count(*) filter (where ${signInAttempts.ip} = ${ip})::int`,
    })
    .from(signInAttempts)
    .where(and(gt(signInAttempts.createdAt, since), eq(signInAttempts.succeeded, false)));
  return { byEmail: row?.byEmail ?? 0, byIp: row?.byIp ?? 0 };
}
