import 'server-only';
import { and, desc, eq, isNull, sql } from 'drizzle-orm';
import { getDb, type Executor } from '@/db/client';
import { projects, tokens, users } from '@/db/schema';

export interface TokenOwner {
  tokenId: string;
  projectId: string;
  projectSlug: string;
  workspaceId: string;
}

/** The live (not revoked) token with this hash, and the project it belongs to. */
export async function getTokenOwnerByHash({ secretHash }: { secretHash: string }): Promise<TokenOwner | undefined> {
  const rows = await getDb()
    .select({
      tokenId: tokens.id,
      projectId: tokens.projectId,
      workspaceId: tokens.workspaceId,
      projectSlug: projects.slug,
    })
    .from(tokens)
    .innerJoin(projects, eq(projects.id, tokens.projectId))
    .where(and(eq(tokens.secretHash, secretHash), isNull(tokens.revokedAt)))
    .limit(1);
  return rows[0];
}

export async function touchToken({ tokenId }: { tokenId: string }): Promise<void> {
  await getDb().update(tokens).set({ lastUsedAt: new Date() }).where(eq(tokens.id, tokenId));
}

export async function insertToken(
  input: {
    workspaceId: string;
    projectId: string;
    name: string;
    prefix: string;
    secretHash: string;
    createdBy?: string | null;
  },
  db: Executor = getDb(),
): Promise<{ id: string }> {
  const [row] = await db
    .insert(tokens)
    .values({ ...input, createdBy: input.createdBy ?? null })
    .returning({ id: tokens.id });
  return row!;
}

export async function revokeToken(
  { id, workspaceId }: { id: string; workspaceId: string },
  db: Executor = getDb(),
): Promise<boolean> {
  const rows = await db
    .update(tokens)
    .set({ revokedAt: new Date() })
    .where(and(eq(tokens.id, id), eq(tokens.workspaceId, workspaceId), isNull(tokens.revokedAt)))
    .returning({ id: tokens.id });
  return rows.length > 0;
}

/** What the tokens page lists: never the hash, only the prefix people recognise. */
export interface TokenRow {
  id: string;
  name: string;
  prefix: string;
  projectSlug: string;
  projectName: string;
  createdByEmail: string | null;
  createdAt: Date;
  lastUsedAt: Date | null;
  revokedAt: Date | null;
}

/** A workspace's tokens, live ones first, newest first within each group. */
export async function listTokens({ workspaceId }: { workspaceId: string }): Promise<TokenRow[]> {
  return getDb()
    .select({
      id: tokens.id,
      name: tokens.name,
      prefix: tokens.prefix,
      projectSlug: projects.slug,
      projectName: projects.name,
      createdByEmail: users.email,
      createdAt: tokens.createdAt,
      lastUsedAt: tokens.lastUsedAt,
      revokedAt: tokens.revokedAt,
    })
    .from(tokens)
    .innerJoin(projects, eq(projects.id, tokens.projectId))
    .leftJoin(users, eq(users.id, tokens.createdBy))
    .where(eq(tokens.workspaceId, workspaceId))
    .orderBy(sql`${tokens.revokedAt} is not null`, desc(tokens.createdAt));
}

export async function getTokenById({ workspaceId, id }: { workspaceId: string; id: string }, db: Executor = getDb()) {
  const rows = await db
    .select({
      id: tokens.id,
      name: tokens.name,
      prefix: tokens.prefix,
      projectId: tokens.projectId,
      revokedAt: tokens.revokedAt,
    })
    .from(tokens)
    .where(and(eq(tokens.workspaceId, workspaceId), eq(tokens.id, id)))
    .limit(1);
  return rows[0];
}
