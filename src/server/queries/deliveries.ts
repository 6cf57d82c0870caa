import 'server-only';
import { eq } from 'drizzle-orm';
import { getDb } from '@/db/client';
import { mailDeliveries } from '@/db/schema';

type DeliveryKind = (typeof mailDeliveries.$inferInsert)['kind'];

export async function insertDelivery(input: { workspaceId?: string | null; kind: DeliveryKind; recipient: string; subject: string; dedupeKey?: string | null; payload?: Record<string, unknown> }): Promise<number | undefined> {
  const rows = await getDb()
    .insert(mailDeliveries)
    .values({ ...input, workspaceId: input.workspaceId ?? null, dedupeKey: input.dedupeKey ?? null, payload: input.payload ?? {} })
    .onConflictDoNothing({ target: mailDeliveries.dedupeKey })
    .returning({ id: mailDeliveries.id });
  return rows[0]?.id;
}

export async function markDeliverySent({ id, messageId }: { id: number; messageId: string }): Promise<void> {
  await getDb().update(mailDeliveries).set({ status: 'sent', messageId, sentAt: new Date() }).where(eq(mailDeliveries.id, id));
}

export async function markDeliveryFailed({ id, error, attempts }: { id: number; error: string; attempts: number }): Promise<void> {
  await getDb().update(mailDeliveries).set({ status: 'failed', lastError: error.slice(0, 2000), attempts }).where(eq(mailDeliveries.id, id));
}
