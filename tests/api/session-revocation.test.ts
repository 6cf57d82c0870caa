import { describe, expect, it } from 'vitest';
import request from 'supertest';
import { newLinkSecret } from '@/src/server/auth/one-time';
import { insertSignInToken } from '@/src/server/queries/users';
import { resetPassword } from '@/src/server/services/accounts';
import { createTestProject } from '../support/api';
import { appUrl } from '../support/env';
import { createTestUser, signInCookie } from '../support/users';
import { testAddress } from '../support/workspaces';

describe('a password reset', () => {
  it('signs out every session issued before it, while a new sign-in works', async () => {
    const project = await createTestProject('gullsway');
    const user = await createTestUser({ workspaceId: project.workspaceId, role: 'viewer' });
    const stolen = await signInCookie(user, testAddress());
    const before = await request(appUrl()).get(`/w/${project.workspaceSlug}`).set('Cookie', stolen).redirects(0);
    expect(before.status).toBe(200);

    // JWT issue times are whole seconds: let the clock move past the stolen session's second.
    await new Promise((r) => setTimeout(r, 1100));
    const { secret, hash } = newLinkSecret();
    await insertSignInToken({
      email: user.email,
      userId: user.id,
      purpose: 'reset',
      tokenHash: hash,
      expiresAt: new Date(Date.now() + 600_000),
    });
    const newPassword = `fresh-${user.password}`;
    await resetPassword(secret, newPassword);

    const after = await request(appUrl()).get(`/w/${project.workspaceSlug}`).set('Cookie', stolen).redirects(0);
    expect(after.status).toBe(307);
    expect(after.headers.location).toMatch(/\/sign-in/);
    const fresh = await signInCookie({ email: user.email, password: newPassword }, testAddress());
    const ok = await request(appUrl()).get(`/w/${project.workspaceSlug}`).set('Cookie', fresh).redirects(0);
    expect(ok.status).toBe(200);
  });
});
