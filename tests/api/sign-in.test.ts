import { describe, expect, it } from 'vitest';
import request from 'supertest';
import { createTestProject } from '../support/api';
import { appUrl } from '../support/env';
import { createTestUser, signInCookie } from '../support/users';

describe('sign-in with e-mail and password', () => {
  it('gives a session that reaches the workspace pages and the API for runs of that workspace', async () => {
    const project = await createTestProject();
    const user = await createTestUser({ workspaceId: project.workspaceId, role: 'viewer' });
    const cookie = await signInCookie(user);
    const session = await request(appUrl()).get('/api/auth/session').set('Cookie', cookie);
    expect(session.body.user.email).toBe(user.email);
    const home = await request(appUrl()).get('/').set('Cookie', cookie).redirects(0);
    expect(home.status).toBe(307);
    expect(home.headers.location).toMatch(/\/w\/test-/);
  });

  it('refuses a wrong password without saying whether the account exists', async () => {
    const user = await createTestUser();
    await expect(signInCookie({ email: user.email, password: 'wrong-password-123' })).rejects.toThrow(/sign-in failed/);
    await expect(
      signInCookie({ email: 'nobody-here@marshfield.example', password: 'wrong-password-123' }),
    ).rejects.toThrow(/sign-in failed/);
  });

  it('locks an account after five failed attempts, even with the right password, across addresses', async () => {
    const user = await createTestUser();
    for (let i = 0; i < 5; i++) {
      await expect(
        signInCookie({ email: user.email, password: `nope-${i}-xxxxxxxx` }, `10.9.0.${i}`),
      ).rejects.toThrow();
    }
    await expect(signInCookie(user, '10.9.0.99')).rejects.toThrow(/rate_limited/);
  });

  it('sets the session cookie httpOnly and SameSite=Lax', async () => {
    const user = await createTestUser();
    const csrf = await fetch(`${appUrl()}/api/auth/csrf`);
    const csrfCookie = csrf.headers
      .getSetCookie()
      .map((c) => c.split(';')[0])
      .join('; ');
    const { csrfToken } = (await csrf.json()) as { csrfToken: string };
    const res = await fetch(`${appUrl()}/api/auth/callback/password`, {
      method: 'POST',
      redirect: 'manual',
      headers: { 'content-type': 'application/x-www-form-urlencoded', cookie: csrfCookie },
      body: new URLSearchParams({ csrfToken, email: user.email, password: user.password }),
    });
    const session = res.headers.getSetCookie().find((c) => c.includes('session-token'));
    expect(session).toBeDefined();
    expect(session).toMatch(/HttpOnly/i);
    expect(session).toMatch(/SameSite=Lax/i);
  });
});
