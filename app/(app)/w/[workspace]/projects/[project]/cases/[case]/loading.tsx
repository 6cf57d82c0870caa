export default function Loading() {
  return (
    <div role="status" aria-live="polite" className="space-y-4">
      <span className="sr-only">Loading the case…</span>
      <div className="h-8 w-72 animate-pulse rounded bg-slate-200 dark:bg-slate-800" />
      <div className="grid gap-6 lg:grid-cols-2">
        <div className="h-32 animate-pulse rounded-lg bg-slate-200 dark:bg-slate-800" />
        <div className="h-32 animate-pulse rounded-lg bg-slate-200 dark:bg-slate-800" />
      </div>
      <div className="h-64 animate-pulse rounded-lg bg-slate-200 dark:bg-slate-800" />
    </div>
  );
}
