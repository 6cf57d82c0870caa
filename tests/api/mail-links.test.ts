/**
 * Sign-in by e-mail link and password reset, end to end through the real SMTP catcher: the
 * request goes through the page's server action, the link is read out of the mail that arrived,
 * and it is used the way the pages use it (the sign-in link page posts to next-auth's
 * `email-link` callback with its CSRF token; the reset page calls its action).
 */
import { randomUUID } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import { callAction, formArgs } from '../support/actions';
import { appUrl } from '../support/env';
import { waitForMail } from '../support/mail';
import { createTestUser, signInCookie } from '../support/users';
import { testAddress } from '../support/workspaces';

const AUTH = 'app/(auth)/actions.ts';

/** Finds `<path>?token=...` in the mail sent to `email` and returns the token. */
async function tokenFromMail(email: string, path: string): Promise<string> {
  const mail = await waitForMail((m) => m.to.includes(email) && m.text.includes(path));
  const url = [...mail.text.matchAll(/https?:\/\/\S+/g)].map((m) => new URL(m[0])).find((u) => u.pathname === path);
  expect(url?.origin).toBe(new URL(appUrl()).origin);
  const token = url!.searchParams.get('token');
  expect(token).toMatch(/^[A-Za-z0-9_-]{43}$/);
  return token!;
}

/** Posts the sign-in link's token to next-auth as the link page's button does; the session cookie header, or null. */
async function signInWithLinkToken(token: string): Promise<string | null> {
  const csrf = await fetch(`${appUrl()}/api/auth/csrf`);
  const jar = csrf.headers.getSetCookie().map((c) => c.split(';')[0]!);
  const { csrfToken } = (await csrf.json()) as { csrfToken: string };
  const res = await fetch(`${appUrl()}/api/auth/callback/email-link`, {
    method: 'POST',
    redirect: 'manual',
    headers: { 'content-type': 'application/x-www-form-urlencoded', cookie: jar.join('; ') },
    body: new URLSearchParams({ csrfToken, token, callbackUrl: appUrl() }),
  });
  const session = res.headers.getSetCookie().find((c) => /session-token=[^;]+/.test(c));
  return session ? [...jar, session.split(';')[0]!].join('; ') : null;
}

async function sessionEmail(cookie: string): Promise<string | undefined> {
  const res = await fetch(`${appUrl()}/api/auth/session`, { headers: { cookie } });
  return ((await res.json()) as { user?: { email?: string } } | null)?.user?.email;
}

describe('sign-in by e-mail link', () => {
  it('mails a link whose page signs the person in, once', async () => {
    const user = await createTestUser();
    const asked = await callAction({
      key: `${AUTH}#askForSignInLink`,
      page: '/sign-in',
      args: formArgs({ email: user.email }),
    });
    expect(asked.result).toMatchObject({ ok: true });
    const token = await tokenFromMail(user.email, '/sign-in/link');

    const page = await fetch(`${appUrl()}/sign-in/link?token=${token}`);
    expect(page.status).toBe(200);
    expect(await page.text()).toContain('Sign in to Varigate');

    const cookie = await signInWithLinkToken(token);
    expect(cookie).not.toBeNull();
    expect(await sessionEmail(cookie!)).toBe(user.email);
    expect(await signInWithLinkToken(token)).toBeNull();
  });

  it('answers the same for an address without an account, and sends nothing there', async () => {
    const email = `stranger-${randomUUID().slice(0, 8)}@saltings.example`;
    const asked = await callAction({ key: `${AUTH}#askForSignInLink`, page: '/sign-in', args: formArgs({ email }) });
    const known = await createTestUser();
    const askedKnown = await callAction({
      key: `${AUTH}#askForSignInLink`,
      page: '/sign-in',
      args: formArgs({ email: known.email }),
    });
    expect(asked.result).toEqual(askedKnown.result);
    await tokenFromMail(known.email, '/sign-in/link');
    await expect(waitForMail((m) => m.to.includes(email), 1000)).rejects.toThrow();
  });
});

describe('password reset', () => {
  it('sets a new password from the mailed link; the old password stops working and the link works once', async () => {
    const user = await createTestUser();
    const asked = await callAction({
      key: `${AUTH}#askForPasswordReset`,
      page: '/reset',
      args: formArgs({ email: user.email }),
    });
    expect(asked.result).toMatchObject({ ok: true });
    const token = await tokenFromMail(user.email, '/reset/confirm');
    const fresh = `tidal-${randomUUID()}`;

    const chosen = await callAction({
      key: `${AUTH}#chooseNewPassword`,
      page: `/reset/confirm?token=${token}`,
      args: formArgs({ token, password: fresh, confirm: fresh }),
    });
    expect(chosen.redirect).toMatch(/\/sign-in\?reset=1/);

    const ip = testAddress();
    const cookie = await signInCookie({ email: user.email, password: fresh }, ip);
    expect(await sessionEmail(cookie)).toBe(user.email);
    await expect(signInCookie(user, ip)).rejects.toThrow(/sign-in failed/);

    const again = `second-${randomUUID()}`;
    const reusedSame = await callAction({
      key: `${AUTH}#chooseNewPassword`,
      page: `/reset/confirm?token=${token}`,
      args: formArgs({ token, password: again, confirm: again }),
    });
    expect(reusedSame.redirect).toBeNull();
    expect((reusedSame.result as { message?: string }).message).toMatch(/expired or was already used/);
    await expect(signInCookie({ email: user.email, password: again }, ip)).rejects.toThrow(/sign-in failed/);
  });

  it('refuses a weak new password and leaves the old one working', async () => {
    const user = await createTestUser();
    await callAction({ key: `${AUTH}#askForPasswordReset`, page: '/reset', args: formArgs({ email: user.email }) });
    const token = await tokenFromMail(user.email, '/reset/confirm');
    const weak = await callAction({
      key: `${AUTH}#chooseNewPassword`,
      page: `/reset/confirm?token=${token}`,
      args: formArgs({ token, password: 'abababababababab', confirm: 'abababababababab' }),
    });
    expect(weak.redirect).toBeNull();
    expect((weak.result as { fieldErrors?: { password?: string[] } }).fieldErrors?.password?.[0]).toBeTruthy();
    expect(await sessionEmail(await signInCookie(user, testAddress()))).toBe(user.email);
  });
});
