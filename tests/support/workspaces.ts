import { eq } from 'drizzle-orm';
import { getDb } from '@/db/client';
import { workspaces } from '@/db/schema';

/** The slug of a workspace made by createTestProject, for URLs and action forms. */
export async function workspaceSlug(workspaceId: string): Promise<string> {
  const [row] = await getDb().select({ slug: workspaces.slug }).from(workspaces).where(eq(workspaces.id, workspaceId));
  if (!row) throw new Error(`no workspace ${workspaceId}`);
  return row.slug;
}

/** A client address of its own for each test, so sign-in rate limits of one test never touch another. */
export function testAddress(): string {
  const byte = () => Math.floor(Math.random() * 250) + 1;
  return `10.${byte()}.${byte()}.${byte()}`;
}
