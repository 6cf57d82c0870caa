'use client';

import Link from 'next/link';
import { useParams } from 'next/navigation';
import { Button } from '@/src/components/ui/button';
import { Notice } from '@/src/components/ui/notice';

/** The run page failed on the server (database or storage trouble); the details are in the logs. */
export default function RunError({ error, retry }: { error: unknown; retry: () => void }) {
  const params = useParams<{ workspace: string }>();
  const digest =
    error instanceof Error && 'digest' in error ? String((error as Error & { digest?: string }).digest ?? '') : '';
  return (
    <div className="max-w-2xl space-y-4">
      <h1 className="text-xl font-semibold">The run could not be shown</h1>
      <Notice tone="error">
        Something went wrong on our side while loading this run. It has been logged
        {digest ? ` (reference ${digest})` : ''}; trying again often helps.
      </Notice>
      <div className="flex gap-3">
        <Button onClick={() => retry()}>Try again</Button>
        <Link
          href={`/w/${params.workspace}`}
          className="rounded-md px-3 py-1.5 text-sm hover:bg-slate-100 dark:hover:bg-slate-800"
        >
          Back to the overview
        </Link>
      </div>
    </div>
  );
}
