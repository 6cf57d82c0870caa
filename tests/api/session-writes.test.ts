import { describe, expect, it } from 'vitest';
import request from 'supertest';
import { newLinkSecret } from '@/src/server/auth/one-time';
import { getMembershipById, insertInvitation, upsertMembership } from '@/src/server/queries/users';
import { acceptInvitation } from '@/src/server/services/accounts';
import { createTestProject, fixturePath } from '../support/api';
import { appUrl } from '../support/env';
import { createTestUser, signInCookie } from '../support/users';
import { testAddress } from '../support/workspaces';

describe('writes made with a session', () => {
  it('are refused without an Origin of the app itself, and accepted with it', async () => {
    const project = await createTestProject('wildmere');
    const maintainer = await createTestUser({ workspaceId: project.workspaceId, role: 'maintainer' });
    const cookie = await signInCookie(maintainer, testAddress());
    const body = { workspace: project.workspaceSlug, project: 'wildmere', fileName: 'x.csv', size: 10 };
    const foreign = await request(appUrl())
      .post('/api/v1/uploads')
      .set('Cookie', cookie)
      .set('Origin', 'https://elsewhere.example')
      .send(body);
    expect(foreign.status).toBe(403);
    expect(foreign.body.error.code).toBe('forbidden:origin');
    const none = await request(appUrl()).post('/api/v1/uploads').set('Cookie', cookie).send(body);
    expect(none.status).toBe(403);
    const own = await request(appUrl())
      .post('/api/v1/uploads')
      .set('Cookie', cookie)
      .set('Origin', new URL(appUrl()).origin)
      .send(body);
    expect(own.status).toBe(201);
  });

  it('leave CI tokens alone: a token needs no Origin', async () => {
    const project = await createTestProject('wildmere');
    const res = await request(appUrl())
      .post('/api/v1/runs')
      .set('Authorization', `Bearer ${project.token}`)
      .field('build', 'b1')
      .field('commit', 'c1')
      .field('branch', 'main')
      .field('case', 'x')
      .attach('file', fixturePath('snapshots', 'tophat-van-leer.csv'));
    expect(res.status).toBe(202);
  });
});

describe('accepting an invitation', () => {
  it('never changes the role of someone who is already a member', async () => {
    const project = await createTestProject('wildmere');
    const admin = await createTestUser({ workspaceId: project.workspaceId, role: 'admin' });
    // An invitation as viewer, sent before the person became admin by another way.
    const { secret, hash } = newLinkSecret();
    await insertInvitation({
      workspaceId: project.workspaceId,
      email: admin.email,
      role: 'viewer',
      tokenHash: hash,
      invitedBy: null,
      expiresAt: new Date(Date.now() + 3600_000),
    });
    await upsertMembership({ workspaceId: project.workspaceId, userId: admin.id, role: 'admin' });
    await acceptInvitation(secret, { userId: admin.id, email: admin.email });
    const membership = await getMembershipById({ userId: admin.id, workspaceId: project.workspaceId });
    expect(membership?.role).toBe('admin');
  });
});
