import type { ReactNode, TdHTMLAttributes, ThHTMLAttributes } from 'react';

/** The plain tables of the settings pages: a caption for screen readers, header cells on top. */
export function SettingsTable({ caption, head, children }: { caption: string; head: ReactNode; children: ReactNode }) {
  return (
    <div className="-mx-4 overflow-x-auto px-4">
      <table className="w-full min-w-[40rem] border-collapse text-left text-sm">
        <caption className="sr-only">{caption}</caption>
        <thead className="border-b border-slate-200 text-xs uppercase tracking-wide text-slate-500 dark:border-slate-800">
          <tr>{head}</tr>
        </thead>
        <tbody className="divide-y divide-slate-100 dark:divide-slate-800">{children}</tbody>
      </table>
    </div>
  );
}

export function Th({ children, className = '', ...props }: ThHTMLAttributes<HTMLTableCellElement>) {
  return (
    <th scope="col" className={`py-2 pr-4 font-medium ${className}`} {...props}>
      {children}
    </th>
  );
}

export function Td({ children, className = '', ...props }: TdHTMLAttributes<HTMLTableCellElement>) {
  return (
    <td className={`py-2 pr-4 align-middle ${className}`} {...props}>
      {children}
    </td>
  );
}

/** A one-line answer of a row's form, next to the control that caused it. */
export function RowMessage({ ok, children }: { ok?: boolean; children?: ReactNode }) {
  if (!children) return null;
  return (
    <p role={ok ? 'status' : 'alert'} className={`mt-1 text-xs ${ok ? 'text-verdict-pass' : 'text-verdict-fail'}`}>
      {children}
    </p>
  );
}
