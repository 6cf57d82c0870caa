/**
 * Cross-workspace isolation: a signed-in person who guesses the id or slug of another
 * workspace's run, build, project, member, invitation or token learns nothing — every page and
 * API answer is the same 404 a missing thing gets, and no action touches it. Each refusal is
 * paired with a positive control (a member of the right workspace gets the thing), so a route
 * that answered 404 to everyone would fail too.
 */
import { randomBytes, randomUUID } from 'node:crypto';
import { beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { getTokenById } from '@/src/server/queries/tokens';
import { getInvitationById, getMember, insertInvitation } from '@/src/server/queries/users';
import { listTokens } from '@/src/server/queries/tokens';
import { callAction, formArgs, type ActionAnswer } from '../support/actions';
import { createTestProject, fixturePath, postRun, waitForRun, type TestProject } from '../support/api';
import { appUrl } from '../support/env';
import { createTestUser, signInCookie } from '../support/users';
import { testAddress, workspaceSlug } from '../support/workspaces';

interface Side {
  project: TestProject;
  slug: string;
  cookie: string;
  userId: string;
}

let alpha: Side;
let beta: Side;
let runId: string;
const buildKey = `iso-${randomUUID().slice(0, 6)}`;
const caseName = 'estuary-front';

async function side(projectSlug: string, role: 'viewer' | 'admin'): Promise<Side> {
  const project = await createTestProject(projectSlug);
  const user = await createTestUser({ workspaceId: project.workspaceId, role });
  return {
    project,
    slug: await workspaceSlug(project.workspaceId),
    cookie: await signInCookie(user, testAddress()),
    userId: user.id,
  };
}

beforeAll(async () => {
  alpha = await side('iso-alpha', 'viewer');
  beta = await side('iso-beta', 'admin');
  const posted = await postRun(
    alpha.project.token,
    { build: buildKey, case: caseName },
    { path: fixturePath('snapshots', 'tophat-van-leer.csv') },
  );
  expect(posted.status).toBe(202);
  runId = posted.body.run.id;
  await waitForRun(alpha.project.token, runId);
});

async function status(url: string, cookie: string): Promise<number> {
  const res = await fetch(`${appUrl()}${url}`, { headers: { cookie }, redirect: 'manual' });
  await res.arrayBuffer();
  return res.status;
}

async function statuses(urls: string[], cookie: string): Promise<Record<string, number>> {
  const out: Record<string, number> = {};
  for (const url of urls) out[url] = await status(url, cookie);
  return out;
}

const all = (urls: string[], code: number) => Object.fromEntries(urls.map((u) => [u, code]));

describe('pages', () => {
  it('answers 404 to a member of another workspace for every page of this one, and 200 to its own member', async () => {
    const urls = [
      `/w/${alpha.slug}`,
      `/w/${alpha.slug}/projects/iso-alpha`,
      `/w/${alpha.slug}/projects/iso-alpha/builds/${buildKey}`,
      `/w/${alpha.slug}/projects/iso-alpha/cases/${caseName}`,
      `/w/${alpha.slug}/runs/${runId}`,
      `/w/${alpha.slug}/settings/members`,
    ];
    expect(await statuses(urls, alpha.cookie)).toEqual(all(urls, 200));
    expect(await statuses(urls, beta.cookie)).toEqual(all(urls, 404));
    const adminOnly = [
      `/w/${alpha.slug}/settings/tokens`,
      `/w/${alpha.slug}/settings/audit`,
      `/w/${alpha.slug}/projects/iso-alpha/settings`,
    ];
    expect(await statuses(adminOnly, beta.cookie)).toEqual(all(adminOnly, 404));
  });

  it("answers 404 when another workspace's run id, project slug or build key is put in one's own workspace URL", async () => {
    const own = [`/w/${beta.slug}`, `/w/${beta.slug}/projects/iso-beta`];
    expect(await statuses(own, beta.cookie)).toEqual(all(own, 200));
    const guessed = [
      `/w/${beta.slug}/runs/${runId}`,
      `/w/${beta.slug}/projects/iso-alpha`,
      `/w/${beta.slug}/projects/iso-alpha/builds/${buildKey}`,
      `/w/${beta.slug}/projects/iso-beta/builds/${buildKey}`,
    ];
    expect(await statuses(guessed, beta.cookie)).toEqual(all(guessed, 404));
  });

  it("shows the not-found page for another workspace's case name put in one's own project URL", async () => {
    // The case page streams behind a loading boundary, so Next has sent 200 before the lookup
    // fails; what matters here is that nothing of the other workspace's case is shown.
    const res = await fetch(`${appUrl()}/w/${beta.slug}/projects/iso-beta/cases/${caseName}`, {
      headers: { cookie: beta.cookie },
    });
    const notFoundMarker = /<meta name="robots" content="noindex"/;
    const html = await res.text();
    expect(html).toMatch(notFoundMarker);
    expect(html).not.toContain(buildKey);
    const own = await fetch(`${appUrl()}/w/${alpha.slug}/projects/iso-alpha/cases/${caseName}`, {
      headers: { cookie: alpha.cookie },
    });
    const ownHtml = await own.text();
    expect(ownHtml).not.toMatch(notFoundMarker);
    expect(ownHtml).toContain(buildKey);
  });

  it('answers a missing workspace and a workspace one is not in alike', async () => {
    expect(await status(`/w/no-such-${randomUUID().slice(0, 6)}`, beta.cookie)).toBe(404);
    expect(await status(`/w/${alpha.slug}`, beta.cookie)).toBe(404);
  });
});

describe('API', () => {
  const runUrls = () => [
    `/api/v1/runs/${runId}`,
    `/api/v1/runs/${runId}/series`,
    `/api/v1/runs/${runId}/steps/0`,
    `/api/v1/runs/${runId}/metrics`,
    `/api/v1/runs/${runId}/file`,
  ];

  it("answers 404 not_found:run for another workspace's run and its data, to a session and to a CI token", async () => {
    const own = await request(appUrl()).get(`/api/v1/runs/${runId}`).set('Cookie', alpha.cookie);
    expect(own.status).toBe(200);
    for (const url of runUrls()) {
      const bySession = await request(appUrl()).get(url).set('Cookie', beta.cookie).redirects(0);
      expect([url, bySession.status, bySession.body?.error?.code]).toEqual([url, 404, 'not_found:run']);
      const byToken = await request(appUrl())
        .get(url)
        .set('Authorization', `Bearer ${beta.project.token}`)
        .redirects(0);
      expect([url, byToken.status]).toEqual([url, 404]);
    }
  });

  it("answers 404 for another workspace's build, whether its workspace or only its project is named", async () => {
    const own = await request(appUrl())
      .get(`/api/v1/builds/${buildKey}?workspace=${alpha.slug}&project=iso-alpha`)
      .set('Cookie', alpha.cookie);
    expect(own.status).toBe(200);
    const theirs = await request(appUrl())
      .get(`/api/v1/builds/${buildKey}?workspace=${alpha.slug}&project=iso-alpha`)
      .set('Cookie', beta.cookie);
    expect([theirs.status, theirs.body.error.code]).toEqual([404, 'not_found:workspace']);
    const guessed = await request(appUrl())
      .get(`/api/v1/builds/${buildKey}?workspace=${beta.slug}&project=iso-alpha`)
      .set('Cookie', beta.cookie);
    expect([guessed.status, guessed.body.error.code]).toEqual([404, 'not_found:project']);
    const ownProject = await request(appUrl())
      .get(`/api/v1/builds/${buildKey}?workspace=${beta.slug}&project=iso-beta`)
      .set('Cookie', beta.cookie);
    expect(ownProject.status).toBe(404);
  });
});

describe('actions naming their own workspace but another workspace’s ids', () => {
  const code = (a: ActionAnswer) => (a.result as { code?: string } | undefined)?.code;
  const asBetaAdmin = (file: 'members' | 'tokens', name: string, fields: Record<string, string>) =>
    callAction({
      key: `app/(app)/w/[workspace]/settings/${file}/actions.ts#${name}`,
      page: `/w/${beta.slug}/settings/${file}`,
      args: formArgs({ workspace: beta.slug, ...fields }),
      cookie: beta.cookie,
    });

  it("cannot change the role of, or remove, another workspace's member", async () => {
    expect(code(await asBetaAdmin('members', 'changeRoleAction', { userId: alpha.userId, role: 'admin' }))).toBe(
      'not_found:member',
    );
    expect(code(await asBetaAdmin('members', 'removeMemberAction', { userId: alpha.userId }))).toBe('not_found:member');
    expect((await getMember({ workspaceId: alpha.project.workspaceId, userId: alpha.userId }))?.role).toBe('viewer');
  });

  it("cannot revoke another workspace's invitation", async () => {
    const invitation = await insertInvitation({
      workspaceId: alpha.project.workspaceId,
      email: `guarded-${randomUUID().slice(0, 6)}@saltings.example`,
      role: 'viewer',
      tokenHash: randomBytes(32).toString('hex'),
      invitedBy: null,
      expiresAt: new Date(Date.now() + 86_400_000),
    });
    expect(code(await asBetaAdmin('members', 'revokeInvitationAction', { invitationId: invitation.id }))).toBe(
      'not_found:invitation',
    );
    expect(
      (await getInvitationById({ workspaceId: alpha.project.workspaceId, id: invitation.id }))?.revokedAt,
    ).toBeNull();
  });

  it("cannot revoke another workspace's CI token, nor create one for its project", async () => {
    expect(code(await asBetaAdmin('tokens', 'revokeTokenAction', { tokenId: alpha.project.tokenId }))).toBe(
      'not_found:token',
    );
    expect(
      (await getTokenById({ workspaceId: alpha.project.workspaceId, id: alpha.project.tokenId }))?.revokedAt,
    ).toBeNull();
    const before = (await listTokens({ workspaceId: alpha.project.workspaceId })).length;
    expect(
      code(await asBetaAdmin('tokens', 'createTokenAction', { projectId: alpha.project.projectId, name: 'smuggled' })),
    ).toBe('not_found:project');
    expect((await listTokens({ workspaceId: alpha.project.workspaceId })).length).toBe(before);
    expect((await listTokens({ workspaceId: beta.project.workspaceId })).some((t) => t.name === 'smuggled')).toBe(
      false,
    );
  });
});
