import Link from 'next/link';

export type PagerProps = { page: number; hasNext: boolean; href: (page: number) => string; label?: string };

export function Pager({ page, hasNext, href, label = 'Pages' }: PagerProps) {
  return (
    <nav aria-label={label} className="mt-4 flex items-center gap-3 text-sm">
      {page > 1 ? (
        <Link
          className="rounded-md border border-slate-300 px-2 py-1 hover:bg-slate-50 dark:border-slate-700 dark:hover:bg-slate-800"
          href={href(page - 1)}
          rel="prev"
        >
          ← Previous
        </Link>
      ) : null}
      <span className="text-slate-500">Page {page}</span>
      {hasNext ? (
        <Link
          className="rounded-md border border-slate-300 px-2 py-1 hover:bg-slate-50 dark:border-slate-700 dark:hover:bg-slate-800"
          href={href(page + 1)}
          rel="next"
        >
          Next →
        </Link>
      ) : null}
    </nav>
  );
}
