import { Card } from '@/src/components/ui/card';
import { formatDateTime } from '@/src/lib/format';
import type { RunNoteRow } from '@/src/server/queries/run-notes';
import { RunNoteForm } from './run-note-form';

export type RunNotesProps = { workspace: string; runId: string; notes: RunNoteRow[] };

/** What people noted about this run: a suspected cause, a rerun, a link to the fix. */
export function RunNotes({ workspace, runId, notes }: RunNotesProps) {
  return (
    <Card title={`Notes (${notes.length})`}>
      {notes.length === 0 ? (
        <p className="text-sm text-slate-500 dark:text-slate-400">No notes yet.</p>
      ) : (
        <ol className="space-y-3" data-testid="run-notes">
          {notes.map((n) => (
            <li key={n.id} className="text-sm">
              <p className="whitespace-pre-wrap break-words">{n.body}</p>
              <p className="mt-0.5 text-xs text-slate-500 dark:text-slate-400">
                {n.authorName ?? n.authorEmail ?? 'a former member'} · {formatDateTime(n.createdAt)}
              </p>
            </li>
          ))}
        </ol>
      )}
      <RunNoteForm workspace={workspace} runId={runId} />
    </Card>
  );
}
