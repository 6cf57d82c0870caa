import 'server-only';
import { getDb, type Executor } from '@/db/client';
import { auditEvents } from '@/db/schema';

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
