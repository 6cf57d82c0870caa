import type { Metadata } from 'next';
import { notFound } from 'next/navigation';
import { devMailEnabled, listCaughtMail } from '@/src/server/services/dev-mail';

export const dynamic = 'force-dynamic';
export const metadata: Metadata = { title: 'Local mail' };

/** Development only: what the app sent to the local SMTP catcher, newest first. */
export default async function DevMailPage() {
  if (!devMailEnabled()) notFound();
  const messages = await listCaughtMail();
  return (
    <main className="mx-auto max-w-4xl px-6 py-10">
      <h1 className="text-2xl font-semibold">Local mail</h1>
      <p className="mt-2 text-sm text-slate-500">
        Messages the app sent to the local SMTP catcher. This page exists only where the catcher is configured.
      </p>
      {messages.length === 0 ? (
        <p className="mt-8 text-slate-600" data-testid="dev-mail-empty">
          No mail yet.
        </p>
      ) : (
        <ol className="mt-8 space-y-6" data-testid="dev-mail-list">
          {messages.map((m) => (
            <li key={m.id} className="rounded-lg border border-slate-200 p-4 dark:border-slate-800">
              <div className="text-sm text-slate-500">
                {new Date(m.receivedAt).toLocaleString('en-GB', { timeZone: 'UTC' })} UTC · to {m.to}
              </div>
              <h2 className="mt-1 font-medium">{m.subject}</h2>
              <pre className="mt-3 whitespace-pre-wrap font-mono text-sm">{m.text}</pre>
            </li>
          ))}
        </ol>
      )}
    </main>
  );
}
