'use client';

import { useActionState, useEffect, useRef } from 'react';
import { addRunNoteAction, type NoteFormState } from '@/app/(app)/w/[workspace]/runs/[run]/actions';
import { Button } from '@/src/components/ui/button';
import { Notice } from '@/src/components/ui/notice';

export type RunNoteFormProps = { workspace: string; runId: string };

export function RunNoteForm({ workspace, runId }: RunNoteFormProps) {
  const [state, action, pending] = useActionState<NoteFormState, FormData>(addRunNoteAction, {});
  const form = useRef<HTMLFormElement>(null);
  useEffect(() => {
    if (state.ok) form.current?.reset();
  }, [state]);
  const error = state.fieldErrors?.body?.[0];
  return (
    <form ref={form} action={action} className="mt-4 space-y-2" aria-label="Add a note">
      <input type="hidden" name="workspace" value={workspace} />
      <input type="hidden" name="runId" value={runId} />
      {state.message ? <Notice tone="error">{state.message}</Notice> : null}
      <label htmlFor="run-note-body" className="block text-sm font-medium text-slate-700 dark:text-slate-200">
        Add a note
      </label>
      <textarea
        id="run-note-body"
        name="body"
        rows={2}
        maxLength={2000}
        required
        aria-invalid={error ? true : undefined}
        className="block w-full rounded-md border border-slate-300 bg-white px-2.5 py-1.5 text-sm dark:border-slate-700 dark:bg-slate-900"
      />
      {error ? <p className="text-xs text-verdict-fail">{error}</p> : null}
      <Button type="submit" variant="secondary" disabled={pending}>
        Save note
      </Button>
    </form>
  );
}
