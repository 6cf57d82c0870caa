export type VerdictBadgeProps = { verdict: string | null; status?: string };

const styles: Record<string, string> = {
  pass: 'bg-green-100 text-green-900 dark:bg-green-950 dark:text-green-200',
  warn: 'bg-amber-100 text-amber-900 dark:bg-amber-950 dark:text-amber-200',
  fail: 'bg-red-100 text-red-900 dark:bg-red-950 dark:text-red-200',
  error: 'bg-purple-100 text-purple-900 dark:bg-purple-950 dark:text-purple-200',
  pending: 'bg-slate-100 text-slate-700 dark:bg-slate-800 dark:text-slate-300',
};

/** A verdict in words (never colour alone), or the run's status while it has none. */
export function VerdictBadge({ verdict, status }: VerdictBadgeProps) {
  const label = verdict ?? (status === 'analysing' ? 'analysing' : status === 'queued' ? 'queued' : 'pending');
  return (
    <span
      className={`inline-block rounded px-1.5 py-0.5 text-xs font-semibold uppercase tracking-wide ${styles[verdict ?? 'pending']}`}
      data-verdict={verdict ?? 'none'}
    >
      {label}
    </span>
  );
}
