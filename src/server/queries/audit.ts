import 'server-only';
import { and, desc, eq, lt } from 'drizzle-orm';
import { getDb, type Executor } from '@/db/client';
import { auditEvents, tokens, users } from '@/db/schema';

export async function insertAuditEvent(
  input: {
    workspaceId: string;
    actorUserId?: string | null;
    actorTokenId?: string | null;
    action: string;
    targetType: string;
    targetId?: string | null;
    details?: Record<string, unknown>;
  },
  db: Executor = getDb(),
): Promise<void> {
  await db.insert(auditEvents).values({
    ...input,
    actorUserId: input.actorUserId ?? null,
    actorTokenId: input.actorTokenId ?? null,
    targetId: input.targetId ?? null,
    details: input.details ?? {},
  });
}

export interface AuditEventRow {
  id: number;
  action: string;
  targetType: string;
  targetId: string | null;
  details: unknown;
  createdAt: Date;
  actorUserId: string | null;
  /** Null when the actor was a token or the system, or a person whose account was deleted since. */
  actorEmail: string | null;
  actorTokenPrefix: string | null;
}

export interface AuditPage {
  events: AuditEventRow[];
  /** The id to pass as `before` for the next (older) page; null on the last page. */
  nextBefore: number | null;
}

/**
 * One page of a workspace's audit log, newest first. Paged by id (a keyset), so events written
 * while someone reads never shift or repeat rows between pages.
 */
export async function listAuditEvents({
  workspaceId,
  before,
  limit,
}: {
  workspaceId: string;
  before?: number;
  limit: number;
}): Promise<AuditPage> {
  const rows = await getDb()
    .select({
      id: auditEvents.id,
      action: auditEvents.action,
      targetType: auditEvents.targetType,
      targetId: auditEvents.targetId,
      details: auditEvents.details,
      createdAt: auditEvents.createdAt,
      actorUserId: auditEvents.actorUserId,
      actorEmail: users.email,
      actorTokenPrefix: tokens.prefix,
    })
    .from(auditEvents)
    .leftJoin(users, eq(users.id, auditEvents.actorUserId))
    .leftJoin(tokens, and(eq(tokens.id, auditEvents.actorTokenId), eq(tokens.workspaceId, workspaceId)))
    .where(
      before === undefined
        ? eq(auditEvents.workspaceId, workspaceId)
        : and(eq(auditEvents.workspaceId, workspaceId), lt(auditEvents.id, before)),
    )
    .orderBy(desc(auditEvents.id))
    .limit(limit + 1);
  const events = rows.slice(0, limit);
  return { events, nextBefore: rows.length > limit ? events[events.length - 1]!.id : null };
}
