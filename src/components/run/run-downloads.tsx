export type RunDownloadsProps = { runId: string; hasMetrics: boolean };

const link =
  'rounded-md border border-slate-300 px-2.5 py-1 hover:bg-slate-50 dark:border-slate-700 dark:hover:bg-slate-800';

/** The raw upload and the per-step metrics, for looking at them outside Varigate. */
export function RunDownloads({ runId, hasMetrics }: RunDownloadsProps) {
  return (
    <nav aria-label="Downloads" className="flex flex-wrap items-center gap-2 text-sm">
      <a href={`/api/v1/runs/${runId}/file`} className={link} data-testid="download-file">
        Raw file
      </a>
      {hasMetrics ? (
        <>
          <a href={`/api/v1/runs/${runId}/metrics?format=csv`} className={link} download data-testid="download-csv">
            Metrics CSV
          </a>
          <a href={`/api/v1/runs/${runId}/metrics?format=json`} className={link} download data-testid="download-json">
            Metrics JSON
          </a>
        </>
      ) : null}
    </nav>
  );
}
