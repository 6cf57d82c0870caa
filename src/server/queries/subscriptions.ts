import 'server-only';
import { and, asc, eq, isNull } from 'drizzle-orm';
import { getDb, type Executor } from '@/db/client';
import { projects, subscriptions, workspaces, type Subscription } from '@/db/schema';

/**
 * Subscriptions to a project's weekly digest and failure alerts: a member's own (user_id set)
 * or a mailing-list address added by a maintainer (user_id null). "Off" is a row with both
 * switches false. Functions named `...Global...` serve the worker and the unsubscribe link,
 * which act for every workspace and find the workspace from the row itself.
 */

export type SubscriptionSettings = Pick<
  Subscription,
  'weeklyDigest' | 'failureAlerts' | 'digestDay' | 'digestHour' | 'timeZone'
>;

export interface SubscriptionWithProject extends Subscription {
  projectSlug: string;
  projectName: string;
  defaultBranch: string;
  workspaceSlug: string;
  workspaceName: string;
}

const withProjectColumns = {
  subscription: subscriptions,
  projectSlug: projects.slug,
  projectName: projects.name,
  defaultBranch: projects.defaultBranch,
  workspaceSlug: workspaces.slug,
  workspaceName: workspaces.name,
};

type JoinedRow = { subscription: Subscription } & Omit<SubscriptionWithProject, keyof Subscription>;
const flatten = ({ subscription, ...rest }: JoinedRow): SubscriptionWithProject => ({ ...subscription, ...rest });

/** Worker-side scan over every workspace: the timing of every subscription with the digest on. */
export async function listGlobalDigestTimings(): Promise<
  Pick<Subscription, 'id' | 'digestDay' | 'digestHour' | 'timeZone'>[]
> {
  return getDb()
    .select({
      id: subscriptions.id,
      digestDay: subscriptions.digestDay,
      digestHour: subscriptions.digestHour,
      timeZone: subscriptions.timeZone,
    })
    .from(subscriptions)
    .where(eq(subscriptions.weeklyDigest, true));
}

/** A subscription by id with its project and workspace, in any workspace (worker, unsubscribe). */
export async function getGlobalSubscription(
  { id }: { id: string },
  db: Executor = getDb(),
): Promise<SubscriptionWithProject | undefined> {
  const rows = await db
    .select(withProjectColumns)
    .from(subscriptions)
    .innerJoin(projects, eq(projects.id, subscriptions.projectId))
    .innerJoin(workspaces, eq(workspaces.id, subscriptions.workspaceId))
    .where(eq(subscriptions.id, id))
    .limit(1);
  return rows[0] ? flatten(rows[0]) : undefined;
}

/** Turns one or both mails of a subscription off (the unsubscribe link); true when a row changed. */
export async function switchOffGlobalSubscription({
  id,
  digest,
  alerts,
}: {
  id: string;
  digest: boolean;
  alerts: boolean;
}): Promise<boolean> {
  const set: Partial<Pick<Subscription, 'weeklyDigest' | 'failureAlerts'>> = {};
  if (digest) set.weeklyDigest = false;
  if (alerts) set.failureAlerts = false;
  if (Object.keys(set).length === 0) return false;
  const rows = await getDb()
    .update(subscriptions)
    .set(set)
    .where(eq(subscriptions.id, id))
    .returning({ id: subscriptions.id });
  return rows.length > 0;
}

export async function listAlertSubscriptions({
  workspaceId,
  projectId,
}: {
  workspaceId: string;
  projectId: string;
}): Promise<Subscription[]> {
  return getDb()
    .select()
    .from(subscriptions)
    .where(
      and(
        eq(subscriptions.workspaceId, workspaceId),
        eq(subscriptions.projectId, projectId),
        eq(subscriptions.failureAlerts, true),
      ),
    )
    .orderBy(asc(subscriptions.email));
}

/** A member's own subscriptions in a workspace, one per project at most. */
export async function listUserSubscriptions({
  workspaceId,
  userId,
}: {
  workspaceId: string;
  userId: string;
}): Promise<Subscription[]> {
  return getDb()
    .select()
    .from(subscriptions)
    .where(and(eq(subscriptions.workspaceId, workspaceId), eq(subscriptions.userId, userId)));
}

/** Mailing-list addresses subscribed in a workspace, with their project's slug. */
export async function listMailingLists({
  workspaceId,
}: {
  workspaceId: string;
}): Promise<(Subscription & { projectSlug: string })[]> {
  const rows = await getDb()
    .select({ subscription: subscriptions, projectSlug: projects.slug })
    .from(subscriptions)
    .innerJoin(projects, eq(projects.id, subscriptions.projectId))
    .where(and(eq(subscriptions.workspaceId, workspaceId), isNull(subscriptions.userId)))
    .orderBy(asc(projects.slug), asc(subscriptions.email));
  return rows.map((r) => ({ ...r.subscription, projectSlug: r.projectSlug }));
}

export async function getSubscription({
  workspaceId,
  id,
}: {
  workspaceId: string;
  id: string;
}): Promise<Subscription | undefined> {
  const rows = await getDb()
    .select()
    .from(subscriptions)
    .where(and(eq(subscriptions.workspaceId, workspaceId), eq(subscriptions.id, id)))
    .limit(1);
  return rows[0];
}

export async function getSubscriptionByEmail({
  workspaceId,
  projectId,
  email,
}: {
  workspaceId: string;
  projectId: string;
  email: string;
}): Promise<Subscription | undefined> {
  const rows = await getDb()
    .select()
    .from(subscriptions)
    .where(
      and(
        eq(subscriptions.workspaceId, workspaceId),
        eq(subscriptions.projectId, projectId),
        eq(subscriptions.email, email),
      ),
    )
    .limit(1);
  return rows[0];
}

/**
 * Creates or updates the subscription of (project, email). A member's row carries their user id;
 * a mailing list's row has none. The unique index on (project, email) keeps one row per address.
 */
export async function upsertSubscription(input: {
  workspaceId: string;
  projectId: string;
  userId: string | null;
  email: string;
  settings: SubscriptionSettings;
}): Promise<Subscription> {
  const [row] = await getDb()
    .insert(subscriptions)
    .values({
      workspaceId: input.workspaceId,
      projectId: input.projectId,
      userId: input.userId,
      email: input.email,
      ...input.settings,
    })
    .onConflictDoUpdate({
      target: [subscriptions.projectId, subscriptions.email],
      set: { ...input.settings, userId: input.userId },
    })
    .returning();
  return row!;
}

/** Inserts a subscription only if (project, email) has none; returns the row either way. */
export async function ensureSubscription(input: {
  workspaceId: string;
  projectId: string;
  userId: string | null;
  email: string;
  settings: SubscriptionSettings;
}): Promise<Subscription> {
  await getDb()
    .insert(subscriptions)
    .values({
      workspaceId: input.workspaceId,
      projectId: input.projectId,
      userId: input.userId,
      email: input.email,
      ...input.settings,
    })
    .onConflictDoNothing({ target: [subscriptions.projectId, subscriptions.email] });
  return (await getSubscriptionByEmail(input))!;
}

export async function deleteSubscription({ workspaceId, id }: { workspaceId: string; id: string }): Promise<boolean> {
  const rows = await getDb()
    .delete(subscriptions)
    .where(and(eq(subscriptions.workspaceId, workspaceId), eq(subscriptions.id, id)))
    .returning({ id: subscriptions.id });
  return rows.length > 0;
}
