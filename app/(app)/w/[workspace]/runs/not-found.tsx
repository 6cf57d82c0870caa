import Link from 'next/link';

/** A run id that this workspace does not have (or that is not a run id at all). */
export default function RunNotFound() {
  return (
    <div className="max-w-2xl space-y-3" data-testid="run-not-found">
      <h1 className="text-xl font-semibold">No such run here</h1>
      <p className="text-sm text-slate-600 dark:text-slate-400">
        This workspace has no run with that id. It may belong to another workspace, or the link may be cut short.
      </p>
      <Link href=".." className="text-sm text-sky-700 hover:underline dark:text-sky-400">
        Back to the overview
      </Link>
    </div>
  );
}
