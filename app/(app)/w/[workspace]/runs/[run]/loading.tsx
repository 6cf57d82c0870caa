/** Shown while the run page's server component loads the run; shaped like the page to avoid a jump. */
export default function RunLoading() {
  const block = 'animate-pulse rounded-lg bg-slate-200 dark:bg-slate-800';
  return (
    <div className="space-y-6" aria-busy="true" aria-live="polite">
      <p className="sr-only">Loading the run…</p>
      <div className="space-y-2">
        <div className={`${block} h-4 w-64`} />
        <div className={`${block} h-8 w-80 max-w-full`} />
        <div className={`${block} h-4 w-96 max-w-full`} />
      </div>
      <div className="grid gap-6 lg:grid-cols-[minmax(0,22rem)_minmax(0,1fr)]">
        <div className={`${block} h-64`} />
        <div className="space-y-4">
          <div className={`${block} h-80`} />
          <div className={`${block} h-96`} />
        </div>
      </div>
    </div>
  );
}
