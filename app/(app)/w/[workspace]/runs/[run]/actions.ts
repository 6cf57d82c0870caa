'use server';

import { revalidatePath } from 'next/cache';
import { z } from 'zod';
import { authorizeMember } from '@/src/server/auth/session';
import { AppError } from '@/src/server/errors';
import { addRunNote, MAX_NOTE_LENGTH } from '@/src/server/services/run-notes';

export interface NoteFormState {
  ok?: boolean;
  message?: string;
  fieldErrors?: { body?: string[] };
}

const noteSchema = z.object({
  workspace: z.string().min(1).max(100),
  runId: z.uuid(),
  body: z
    .string()
    .trim()
    .min(1, 'Write something first.')
    .max(MAX_NOTE_LENGTH, `At most ${MAX_NOTE_LENGTH} characters.`),
});

/** Adds a note to a run; every member of the workspace may (viewers annotate runs too). */
export async function addRunNoteAction(_prev: NoteFormState, form: FormData): Promise<NoteFormState> {
  const parsed = noteSchema.safeParse({
    workspace: form.get('workspace'),
    runId: form.get('runId'),
    body: form.get('body'),
  });
  if (!parsed.success)
    return { fieldErrors: { body: z.flattenError(parsed.error).fieldErrors.body ?? ['This note cannot be saved.'] } };
  try {
    const ctx = await authorizeMember(parsed.data.workspace, 'viewer');
    await addRunNote(ctx, parsed.data.runId, parsed.data.body);
  } catch (err) {
    if (err instanceof AppError) return { message: err.message };
    throw err;
  }
  revalidatePath(`/w/${parsed.data.workspace}/runs/${parsed.data.runId}`);
  return { ok: true };
}
