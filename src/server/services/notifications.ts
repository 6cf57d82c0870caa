import 'server-only';
import type { Subscription } from '@/db/schema';
import { type MailingListInput, type MySubscriptionInput } from '@/src/schemas/notifications';
import { roleAtLeast, type Role } from '../auth/roles';
import { AppError } from '../errors';
import { getProjectById, listProjects } from '../queries/projects';
import {
  deleteSubscription,
  ensureSubscription,
  getGlobalSubscription,
  getSubscription,
  getSubscriptionByEmail,
  listMailingLists,
  listUserSubscriptions,
  upsertSubscription,
  type SubscriptionSettings,
} from '../queries/subscriptions';
import { listRecentDeliveries } from '../queries/mail-deliveries';
import { insertAuditEvent } from '../queries/audit';
import { queueDigestPreview } from './digests';

/**
 * The notification settings of the signed-in member (their own subscriptions) and, for
 * maintainers, the mailing-list addresses of the workspace's projects. Callers (server actions)
 * have checked the session and membership; this layer checks the role a change needs and that
 * every id belongs to the member's workspace.
 */

export interface Member {
  workspaceId: string;
  userId: string;
  email: string;
  role: Role;
}

/** The member as a page or action knows them (the shape of requireMember's answer). */
export function memberFrom(ctx: {
  workspace: { id: string };
  user: { id: string; email: string };
  role: Role;
}): Member {
  return { workspaceId: ctx.workspace.id, userId: ctx.user.id, email: ctx.user.email, role: ctx.role };
}

export const DEFAULT_SETTINGS: SubscriptionSettings = {
  weeklyDigest: false,
  failureAlerts: false,
  digestDay: 1,
  digestHour: 8,
  timeZone: 'UTC',
};

export interface ProjectNotificationRow {
  project: { id: string; slug: string; name: string; defaultBranch: string };
  /** The member's own subscription, or null when they never saved one (= off). */
  mine: Subscription | null;
  mailingLists: Subscription[];
}

export interface NotificationSettingsView {
  projects: ProjectNotificationRow[];
  canManageMailingLists: boolean;
  recent: {
    id: number;
    kind: string;
    subject: string;
    status: string;
    createdAt: Date;
    sentAt: Date | null;
    lastError: string | null;
  }[];
}

export async function getNotificationSettings(member: Member): Promise<NotificationSettingsView> {
  const [projects, mine, lists, recent] = await Promise.all([
    listProjects({ workspaceId: member.workspaceId }),
    listUserSubscriptions({ workspaceId: member.workspaceId, userId: member.userId }),
    listMailingLists({ workspaceId: member.workspaceId }),
    listRecentDeliveries({ workspaceId: member.workspaceId, recipient: member.email, limit: 10 }),
  ]);
  return {
    projects: projects.map((p) => ({
      project: { id: p.id, slug: p.slug, name: p.name, defaultBranch: p.defaultBranch },
      mine: mine.find((s) => s.projectId === p.id) ?? null,
      mailingLists: lists.filter((l) => l.projectId === p.id),
    })),
    canManageMailingLists: roleAtLeast(member.role, 'maintainer'),
    recent: recent.map((d) => ({
      id: d.id,
      kind: d.kind,
      subject: d.subject,
      status: d.status,
      createdAt: d.createdAt,
      sentAt: d.sentAt,
      lastError: d.lastError,
    })),
  };
}

async function requireProject(member: Member, projectId: string) {
  const project = await getProjectById({ workspaceId: member.workspaceId, id: projectId });
  if (!project) throw new AppError('not_found:project', 'No such project in this workspace.');
  return project;
}

function settingsOf(input: MySubscriptionInput | MailingListInput): SubscriptionSettings {
  return {
    weeklyDigest: input.weeklyDigest,
    failureAlerts: input.failureAlerts,
    digestDay: input.digestDay,
    digestHour: input.digestHour,
    timeZone: input.timeZone,
  };
}

/** Saves the member's own subscription to a project (any member may subscribe themselves). */
export async function saveMySubscription(member: Member, input: MySubscriptionInput): Promise<Subscription> {
  await requireProject(member, input.projectId);
  const existing = await getSubscriptionByEmail({
    workspaceId: member.workspaceId,
    projectId: input.projectId,
    email: member.email,
  });
  if (existing && existing.userId === null) {
    throw new AppError(
      'conflict:subscription',
      'Your address is subscribed to this project as a mailing list; ask a maintainer to remove that entry first.',
    );
  }
  return upsertSubscription({
    workspaceId: member.workspaceId,
    projectId: input.projectId,
    userId: member.userId,
    email: member.email,
    settings: settingsOf(input),
  });
}

function requireMaintainer(member: Member): void {
  if (!roleAtLeast(member.role, 'maintainer')) {
    throw new AppError('forbidden:role', `Mailing lists are managed by maintainers; you are ${member.role}.`);
  }
}

/** Subscribes (or updates) a mailing-list address for a project; maintainers and admins only. */
export async function saveMailingList(member: Member, input: MailingListInput): Promise<Subscription> {
  requireMaintainer(member);
  await requireProject(member, input.projectId);
  const existing = await getSubscriptionByEmail({
    workspaceId: member.workspaceId,
    projectId: input.projectId,
    email: input.email,
  });
  if (existing && existing.userId !== null) {
    throw new AppError('conflict:subscription', 'This address belongs to a member who manages their own subscription.');
  }
  const row = await upsertSubscription({
    workspaceId: member.workspaceId,
    projectId: input.projectId,
    userId: null,
    email: input.email,
    settings: settingsOf(input),
  });
  await insertAuditEvent({
    workspaceId: member.workspaceId,
    actorUserId: member.userId,
    action: 'mailing-list.saved',
    targetType: 'subscription',
    targetId: row.id,
    details: {
      projectId: input.projectId,
      email: input.email,
      weeklyDigest: input.weeklyDigest,
      failureAlerts: input.failureAlerts,
    },
  });
  return row;
}

export async function removeMailingList(member: Member, subscriptionId: string): Promise<void> {
  requireMaintainer(member);
  const sub = await getSubscription({ workspaceId: member.workspaceId, id: subscriptionId });
  if (!sub || sub.userId !== null)
    throw new AppError('not_found:subscription', 'No such mailing list in this workspace.');
  await deleteSubscription({ workspaceId: member.workspaceId, id: subscriptionId });
  await insertAuditEvent({
    workspaceId: member.workspaceId,
    actorUserId: member.userId,
    action: 'mailing-list.removed',
    targetType: 'subscription',
    targetId: subscriptionId,
    details: { projectId: sub.projectId, email: sub.email },
  });
}

/**
 * "Send me a preview now": the digest of the last seven days to the member's own address. A
 * member without a subscription row gets one in the off state, so the preview's unsubscribe link
 * has something to name.
 */
export async function sendMyDigestPreview(
  member: Member,
  input: { projectId: string; timeZone?: string },
): Promise<void> {
  await requireProject(member, input.projectId);
  const own = await getSubscriptionByEmail({
    workspaceId: member.workspaceId,
    projectId: input.projectId,
    email: member.email,
  });
  if (own && own.userId === null) {
    throw new AppError(
      'conflict:subscription',
      'Your address is subscribed to this project as a mailing list; previews go to members only.',
    );
  }
  const row =
    own ??
    (await ensureSubscription({
      workspaceId: member.workspaceId,
      projectId: input.projectId,
      userId: member.userId,
      email: member.email,
      settings: { ...DEFAULT_SETTINGS, timeZone: input.timeZone || DEFAULT_SETTINGS.timeZone },
    }));
  const sub = await getGlobalSubscription({ id: row.id });
  if (!sub) throw new AppError('not_found:subscription', 'The subscription disappeared; try again.');
  const queued = await queueDigestPreview({ sub, timeZone: input.timeZone || undefined });
  if (!queued)
    throw new AppError('rate_limited:preview', 'A preview was sent less than a minute ago; check your inbox.');
}
