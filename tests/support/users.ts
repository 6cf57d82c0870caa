import { randomUUID } from 'node:crypto';
import type { Page } from 'playwright-core';
import { hashPassword } from '@/src/server/auth/password';
import type { Role } from '@/src/server/auth/roles';
import { insertUser, upsertMembership } from '@/src/server/queries/users';
import { appUrl } from './env';

export interface TestUser {
  id: string;
  email: string;
  password: string;
}

/** A user with a known password, member of `workspaceId` with `role` (or of no workspace). */
export async function createTestUser(
  options: { workspaceId?: string; role?: Role; name?: string } = {},
): Promise<TestUser> {
  const email = `${options.role ?? 'person'}-${randomUUID().slice(0, 8)}@marshfield.example`;
  const password = `pw-${randomUUID()}`;
  const user = await insertUser({
    email,
    name: options.name ?? 'Test person',
    passwordHash: await hashPassword(password),
    emailVerified: true,
  });
  if (options.workspaceId)
    await upsertMembership({ workspaceId: options.workspaceId, userId: user.id, role: options.role ?? 'viewer' });
  return { id: user.id, email, password };
}

/**
 * Signs in through the real next-auth credentials endpoint and returns the Cookie header a
 * browser would send afterwards (session token included).
 */
export async function signInCookie(user: { email: string; password: string }, ip = '127.0.0.1'): Promise<string> {
  const jar = new Map<string, string>();
  const keep = (res: Response) => {
    for (const c of res.headers.getSetCookie()) {
      const [pair] = c.split(';');
      const [name, ...value] = pair!.split('=');
      jar.set(name!, value.join('='));
    }
  };
  const cookieHeader = () => [...jar].map(([k, v]) => `${k}=${v}`).join('; ');
  const csrfRes = await fetch(`${appUrl()}/api/auth/csrf`);
  keep(csrfRes);
  const { csrfToken } = (await csrfRes.json()) as { csrfToken: string };
  const res = await fetch(`${appUrl()}/api/auth/callback/password`, {
    method: 'POST',
    redirect: 'manual',
    headers: { 'content-type': 'application/x-www-form-urlencoded', cookie: cookieHeader(), 'x-forwarded-for': ip },
    body: new URLSearchParams({ csrfToken, email: user.email, password: user.password, callbackUrl: appUrl() }),
  });
  keep(res);
  if (![...jar.keys()].some((k) => k.includes('session-token'))) {
    throw new Error(`sign-in failed for ${user.email}: ${res.status} ${res.headers.get('location')}`);
  }
  return cookieHeader();
}

/** Signs in through the sign-in page, as a person would. */
export async function signInPage(page: Page, user: { email: string; password: string }): Promise<void> {
  await page.goto(`${appUrl()}/sign-in`);
  const form = page.getByRole('form', { name: 'Sign in with password' });
  await form.getByLabel('E-mail').fill(user.email);
  await form.getByLabel('Password').fill(user.password);
  await Promise.all([
    page.waitForURL((url) => !url.pathname.startsWith('/sign-in')),
    form.getByRole('button', { name: 'Sign in' }).click(),
  ]);
  // The landing page redirects once more (to the first workspace) in the browser; a test that
  // opens another page while that is under way races the router, so let it settle first.
  await page.waitForLoadState('networkidle');
}
