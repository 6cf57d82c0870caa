'use client';

import { useQuery } from '@tanstack/react-query';
import { useRouter } from 'next/navigation';
import { useEffect } from 'react';
import { getJson, runApi, runKeys } from './api';

export type RunWaitingProps = { runId: string; status: 'queued' | 'analysing' };

/**
 * Shown while a run waits for or goes through analysis: polls the run every two seconds and
 * reloads the page's server data once it is done or in error.
 */
export function RunWaiting({ runId, status }: RunWaitingProps) {
  const router = useRouter();
  const { data } = useQuery({
    queryKey: runKeys.status(runId),
    queryFn: ({ signal }) => getJson<{ run: { status: string } }>(runApi.status(runId), signal),
    refetchInterval: 2000,
    staleTime: 0,
  });
  const now = data?.run.status ?? status;
  useEffect(() => {
    if (now === 'done' || now === 'error') router.refresh();
  }, [now, router]);
  return (
    <div
      role="status"
      className="flex items-center gap-3 rounded-lg border border-slate-200 bg-white p-4 text-sm dark:border-slate-800 dark:bg-slate-900"
      data-testid="run-waiting"
    >
      <span className="inline-block size-3 animate-pulse rounded-full bg-sky-500" aria-hidden />
      <span>
        {now === 'queued'
          ? 'Queued: waiting for a worker to pick this run up.'
          : 'Analysing: the worker is reading the snapshots step by step.'}{' '}
        This page updates by itself when the verdict is in.
      </span>
    </div>
  );
}
