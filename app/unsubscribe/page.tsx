import type { Metadata } from 'next';
import { describeUnsubscribe, UNSUBSCRIBE_TOKEN_DAYS, type UnsubscribeView } from '@/src/server/services/unsubscribe';

export const dynamic = 'force-dynamic';
export const metadata: Metadata = { title: 'Unsubscribe', robots: { index: false, follow: false } };

/**
 * Where the unsubscribe link of a notification mail leads. Works signed out: the signed token in
 * the address is the credential. Opening the page changes nothing (link scanners open links);
 * the button posts to the one-click handler, which comes back here to show the new state.
 */

type Failure = Extract<UnsubscribeView, { ok: false }>['reason'];

const failures: Record<Failure, { title: string; text: string }> = {
  malformed: {
    title: 'This link is not valid',
    text: 'The unsubscribe address is incomplete or was changed. Copy the whole link from the mail, or change your notifications in the settings after signing in.',
  },
  signature: {
    title: 'This link is not valid',
    text: 'The unsubscribe address is incomplete or was changed. Copy the whole link from the mail, or change your notifications in the settings after signing in.',
  },
  expired: {
    title: 'This link has expired',
    text: `Unsubscribe links work for ${UNSUBSCRIBE_TOKEN_DAYS} days. Use the link of a more recent mail, or change your notifications in the settings after signing in.`,
  },
  gone: { title: 'Nothing to unsubscribe', text: 'This subscription no longer exists; no more mail is sent to it.' },
};

export default async function UnsubscribePage({
  searchParams,
}: {
  searchParams: Promise<Record<string, string | string[] | undefined>>;
}) {
  const params = await searchParams;
  const token = typeof params.token === 'string' ? params.token : '';
  const view: UnsubscribeView = token ? await describeUnsubscribe(token) : { ok: false, reason: 'malformed' };

  if (!view.ok) {
    const f = failures[view.reason];
    return (
      <main className="mx-auto max-w-xl px-6 py-16" data-testid="unsubscribe-invalid">
        <h1 className="text-2xl font-semibold">{f.title}</h1>
        <p className="mt-3 text-slate-600 dark:text-slate-300">{f.text}</p>
      </main>
    );
  }

  const what = view.scope === 'digest' ? 'the weekly digest' : 'failure alerts';
  return (
    <main className="mx-auto max-w-xl px-6 py-16">
      {view.active ? (
        <div data-testid="unsubscribe-confirm">
          <h1 className="text-2xl font-semibold">{`Stop ${what}?`}</h1>
          <p className="mt-3 text-slate-600 dark:text-slate-300">
            {`${view.maskedEmail} receives ${what} of `}
            <strong>{view.projectName}</strong>
            {` in ${view.workspaceName}. Confirm to stop them; other mails to this address are not affected.`}
          </p>
          <form method="post" action={`/unsubscribe/one-click?token=${encodeURIComponent(token)}`} className="mt-6">
            <input type="hidden" name="List-Unsubscribe" value="One-Click" />
            <input type="hidden" name="via" value="page" />
            <button
              type="submit"
              className="rounded-md bg-slate-900 px-4 py-2 text-sm font-medium text-white hover:bg-slate-700 dark:bg-slate-100 dark:text-slate-900"
            >
              Unsubscribe
            </button>
          </form>
        </div>
      ) : (
        <div data-testid="unsubscribe-done">
          <h1 className="text-2xl font-semibold">Unsubscribed</h1>
          <p className="mt-3 text-slate-600 dark:text-slate-300">
            {`${view.maskedEmail} no longer receives ${what} of `}
            <strong>{view.projectName}</strong>
            {` in ${view.workspaceName}.`}
          </p>
        </div>
      )}
      <p className="mt-8 text-sm text-slate-500">
        Members can turn mails back on, or choose another day and hour, in the{' '}
        <a className="underline" href={view.settingsUrl}>
          notification settings
        </a>{' '}
        (sign-in needed).
      </p>
    </main>
  );
}
