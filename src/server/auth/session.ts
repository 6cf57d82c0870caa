import 'server-only';
import { notFound, redirect } from 'next/navigation';
import { AppError } from '../errors';
import { getMembershipBySlug, getUserById, listUserWorkspaces, type WorkspaceMembership } from '../queries/users';
import { auth } from './config';
import { sessionRevoked } from './revocation';
import { roleAtLeast, type Role } from './roles';

/**
 * The one place pages and server actions learn who is asking and what they may do. Every page
 * under /w/<workspace> calls `requireMember` (a non-member gets the same 404 as a missing
 * workspace), and every action that writes calls it with the role the write needs.
 */

export interface SessionUser {
  id: string;
  email: string;
  name: string | null;
}

export interface MemberContext {
  user: SessionUser;
  workspace: { id: string; slug: string; name: string };
  role: Role;
}

/** The signed-in user, or null. A session whose user was deleted counts as signed out. */
export async function getSessionUser(): Promise<SessionUser | null> {
  const session = await auth();
  const id = session?.user?.id;
  if (!id) return null;
  const user = await getUserById({ id });
  if (!user) return null;
  const issuedAt = (session as { issuedAt?: number }).issuedAt ?? 0;
  if (sessionRevoked(issuedAt, user.sessionsValidAfter)) return null;
  return { id: user.id, email: user.email, name: user.name };
}

/** For pages: the signed-in user, or a redirect to the sign-in page. */
export async function requireUser(returnTo?: string): Promise<SessionUser> {
  const user = await getSessionUser();
  if (!user) redirect(returnTo ? `/sign-in?next=${encodeURIComponent(returnTo)}` : '/sign-in');
  return user;
}

export async function listMyWorkspaces(user: SessionUser): Promise<WorkspaceMembership[]> {
  return listUserWorkspaces({ userId: user.id });
}

/** For pages: membership of the workspace in the URL with at least `role`; 404 for non-members. */
export async function requireMember(workspaceSlug: string, role: Role = 'viewer'): Promise<MemberContext> {
  const user = await requireUser(`/w/${workspaceSlug}`);
  const membership = await getMembershipBySlug({ userId: user.id, slug: workspaceSlug });
  if (!membership) notFound();
  if (!roleAtLeast(membership.role, role)) notFound();
  return toContext(user, membership);
}

/**
 * For server actions: like `requireMember`, but throws an AppError instead of redirecting, so
 * the action can answer with a message. Actions are public endpoints: they call this themselves.
 */
export async function authorizeMember(workspaceSlug: string, role: Role): Promise<MemberContext> {
  const user = await getSessionUser();
  if (!user) throw new AppError('unauthorized:session', 'Sign in first.');
  const membership = await getMembershipBySlug({ userId: user.id, slug: workspaceSlug });
  if (!membership) throw new AppError('not_found:workspace', 'No such workspace.');
  if (!roleAtLeast(membership.role, role)) {
    throw new AppError('forbidden:role', `This needs the ${role} role; you are ${membership.role}.`);
  }
  return toContext(user, membership);
}

function toContext(user: SessionUser, m: WorkspaceMembership): MemberContext {
  return { user, workspace: { id: m.workspaceId, slug: m.slug, name: m.name }, role: m.role };
}
