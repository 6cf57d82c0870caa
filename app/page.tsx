import Link from 'next/link';
import { redirect } from 'next/navigation';
import { getSessionUser, listMyWorkspaces } from '@/src/server/auth/session';
import { checkHealth } from '@/src/server/health';

export const dynamic = 'force-dynamic';

/** Signed in: straight to the first workspace. Signed out: what Varigate is, and the way in. */
export default async function HomePage() {
  const user = await getSessionUser();
  if (user) {
    const workspaces = await listMyWorkspaces(user);
    if (workspaces[0]) redirect(`/w/${workspaces[0].slug}`);
  }
  const health = await checkHealth();
  return (
    <main className="mx-auto max-w-3xl px-6 py-16">
      <h1 className="text-3xl font-semibold tracking-tight">Varigate</h1>
      <p className="mt-3 text-slate-600 dark:text-slate-300">
        A regression gate for numerical simulation codes. CI builds post the field snapshots their solvers write;
        Varigate measures total variation per step, new local extrema, overshoot past the allowed bounds and
        conservation drift, and answers pass, warn or fail for each case.
      </p>
      {user ? (
        <p className="mt-6 rounded-md border border-slate-200 p-4 dark:border-slate-800" data-testid="no-workspace">
          You are signed in as {user.email} but belong to no workspace yet. Ask a workspace admin for an invitation.
        </p>
      ) : (
        <p className="mt-6">
          <Link
            href="/sign-in"
            className="inline-block rounded-md bg-slate-900 px-4 py-2 text-sm font-medium text-white dark:bg-slate-100 dark:text-slate-900"
          >
            Sign in
          </Link>
        </p>
      )}
      <section
        aria-labelledby="services-heading"
        className="mt-10 rounded-lg border border-slate-200 p-5 dark:border-slate-800"
      >
        <h2 id="services-heading" className="text-sm font-medium uppercase tracking-wide text-slate-500">
          Services
        </h2>
        <ul className="mt-3 space-y-1" data-testid="service-list">
          {Object.entries(health.services).map(([name, state]) => (
            <li key={name} className="flex items-center gap-2">
              <span
                aria-hidden
                className={`inline-block h-2 w-2 rounded-full ${state.ok ? 'bg-verdict-pass' : 'bg-verdict-fail'}`}
              />
              <span className="font-mono text-sm">{name}</span>
              <span className="text-sm text-slate-500">{state.ok ? 'up' : 'down'}</span>
            </li>
          ))}
        </ul>
      </section>
      <p className="mt-10 text-sm text-slate-500">
        A pass means the snapshots show no spurious oscillation under the case&apos;s policy. It does not show that the
        solver is correct or that the physics is right.
      </p>
    </main>
  );
}
