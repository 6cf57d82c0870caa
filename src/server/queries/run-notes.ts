import 'server-only';
import { and, asc, eq } from 'drizzle-orm';
import { getDb } from '@/db/client';
import { runNotes, users } from '@/db/schema';

export interface RunNoteRow {
  id: string;
  body: string;
  authorName: string | null;
  authorEmail: string | null;
  createdAt: Date;
}

export async function insertRunNote(input: {
  workspaceId: string;
  runId: string;
  authorId: string;
  body: string;
}): Promise<void> {
  await getDb().insert(runNotes).values(input);
}

/** A run's notes, oldest first, with who wrote them. */
export async function listRunNotes({
  workspaceId,
  runId,
}: {
  workspaceId: string;
  runId: string;
}): Promise<RunNoteRow[]> {
  return getDb()
    .select({
      id: runNotes.id,
      body: runNotes.body,
      authorName: users.name,
      authorEmail: users.email,
      createdAt: runNotes.createdAt,
    })
    .from(runNotes)
    .leftJoin(users, eq(users.id, runNotes.authorId))
    .where(and(eq(runNotes.workspaceId, workspaceId), eq(runNotes.runId, runId)))
    .orderBy(asc(runNotes.createdAt));
}
