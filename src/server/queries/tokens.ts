import 'server-only';
import { and, eq, isNull } from 'drizzle-orm';
import { getDb } from '@/db/client';
import { projects, tokens } from '@/db/schema';

export interface TokenOwner {
  tokenId: string;
  projectId: string;
  projectSlug: string;
  workspaceId: string;
}

/** The live (not revoked) token with this hash, and the project it belongs to. */
export async function getTokenOwnerByHash({ secretHash }: { secretHash: string }): Promise<TokenOwner | undefined> {
  const rows = await getDb()
    .select({ tokenId: tokens.id, projectId: tokens.projectId, workspaceId: tokens.workspaceId, projectSlug: projects.slug })
    .from(tokens)
    .innerJoin(projects, eq(projects.id, tokens.projectId))
    .where(and(eq(tokens.secretHash, secretHash), isNull(tokens.revokedAt)))
    .limit(1);
  return rows[0];
}

export async function touchToken({ tokenId }: { tokenId: string }): Promise<void> {
  await getDb().update(tokens).set({ lastUsedAt: new Date() }).where(eq(tokens.id, tokenId));
}

export async function insertToken(input: {
  workspaceId: string;
  projectId: string;
  name: string;
  prefix: string;
  secretHash: string;
  createdBy?: string | null;
}): Promise<{ id: string }> {
  const [row] = await getDb()
    .insert(tokens)
    .values({ ...input, createdBy: input.createdBy ?? null })
    .returning({ id: tokens.id });
  return row!;
}

export async function revokeToken({ id, workspaceId }: { id: string; workspaceId: string }): Promise<boolean> {
  const rows = await getDb()
    .update(tokens)
    .set({ revokedAt: new Date() })
    .where(and(eq(tokens.id, id), eq(tokens.workspaceId, workspaceId), isNull(tokens.revokedAt)))
    .returning({ id: tokens.id });
  return rows.length > 0;
}
