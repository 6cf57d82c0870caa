import 'server-only';
import type { MemberContext } from '../auth/session';
import { AppError } from '../errors';
import { insertRunNote, listRunNotes, type RunNoteRow } from '../queries/run-notes';
import { getRunContext } from '../queries/runs';

export const MAX_NOTE_LENGTH = 2000;

/** Any member may note something on a run of their workspace (viewers included). */
export async function addRunNote(ctx: MemberContext, runId: string, body: string): Promise<void> {
  const run = await getRunContext({ workspaceId: ctx.workspace.id, id: runId });
  if (!run) throw new AppError('not_found:run', 'No such run in this workspace.');
  const text = body.trim();
  if (text.length === 0) throw new AppError('invalid:note', 'Write something first.');
  if (text.length > MAX_NOTE_LENGTH)
    throw new AppError('invalid:note', `A note has at most ${MAX_NOTE_LENGTH} characters.`);
  await insertRunNote({ workspaceId: ctx.workspace.id, runId, authorId: ctx.user.id, body: text });
}

export function getRunNotes(workspaceId: string, runId: string): Promise<RunNoteRow[]> {
  return listRunNotes({ workspaceId, runId });
}
