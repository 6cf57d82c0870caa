import Link from 'next/link';
import { Card } from '../ui/card';
import { SettingsTable, Td, Th } from './table';

export interface AuditListItem {
  id: number;
  when: string;
  actor: string;
  action: string;
  summary: string;
}

export type AuditTableProps = {
  events: AuditListItem[];
  /** Link to the next older page, or null on the last one. */
  olderHref: string | null;
  /** Link back to the newest events, or null when already there. */
  newestHref: string | null;
};

export function AuditTable({ events, olderHref, newestHref }: AuditTableProps) {
  return (
    <Card
      title="Privileged changes, newest first"
      actions={
        <nav aria-label="Audit log pages" className="flex gap-3 text-sm">
          {newestHref ? (
            <Link href={newestHref} className="text-sky-700 hover:underline dark:text-sky-400">
              ← Newest
            </Link>
          ) : null}
          {olderHref ? (
            <Link href={olderHref} className="text-sky-700 hover:underline dark:text-sky-400">
              Older →
            </Link>
          ) : null}
        </nav>
      }
    >
      {events.length === 0 ? (
        <p className="text-sm text-slate-500">Nothing recorded yet.</p>
      ) : (
        <SettingsTable
          caption="Audit events"
          head={
            <>
              <Th>When</Th>
              <Th>Who</Th>
              <Th>Action</Th>
              <Th>What</Th>
            </>
          }
        >
          {events.map((e) => (
            <tr key={e.id} data-testid="audit-row">
              <Td className="whitespace-nowrap text-slate-500">{e.when}</Td>
              <Td className="font-mono text-xs">{e.actor}</Td>
              <Td className="whitespace-nowrap font-mono text-xs">{e.action}</Td>
              <Td>{e.summary}</Td>
            </tr>
          ))}
        </SettingsTable>
      )}
    </Card>
  );
}
