/**
 * The members page's rules, through the real server: the actions are called over HTTP as the
 * browser calls them (tests/support/actions.ts), mail goes through the SMTP catcher, and the
 * database is read afterwards to see what really happened.
 */
import { randomUUID } from 'node:crypto';
import { beforeAll, describe, expect, it } from 'vitest';
import { getSql } from '@/db/client';
import { insertAuditEvent } from '@/src/server/queries/audit';
import { countAdmins, getMember, listPendingInvitationRows } from '@/src/server/queries/users';
import { callAction, formArgs, type ActionAnswer } from '../support/actions';
import { createTestProject, type TestProject } from '../support/api';
import { appUrl } from '../support/env';
import { waitForMail } from '../support/mail';
import { createTestUser, signInCookie, type TestUser } from '../support/users';
import { testAddress, workspaceSlug } from '../support/workspaces';

const MEMBERS = 'app/(app)/w/[workspace]/settings/members/actions.ts';
const TOKENS = 'app/(app)/w/[workspace]/settings/tokens/actions.ts';
const JOIN = 'app/(auth)/actions.ts#joinWorkspace';

interface Team {
  project: TestProject;
  slug: string;
  admin: TestUser;
  cookie: string;
}

async function newTeam(): Promise<Team> {
  const project = await createTestProject('harbour-model');
  const admin = await createTestUser({ workspaceId: project.workspaceId, role: 'admin', name: 'Orla Finch' });
  return {
    project,
    slug: await workspaceSlug(project.workspaceId),
    admin,
    cookie: await signInCookie(admin, testAddress()),
  };
}

function membersAction(
  team: Team,
  name: string,
  fields: Record<string, string>,
  cookie = team.cookie,
): Promise<ActionAnswer> {
  return callAction({
    key: `${MEMBERS}#${name}`,
    page: `/w/${team.slug}/settings/members`,
    args: formArgs({ workspace: team.slug, ...fields }),
    cookie,
  });
}

const codeOf = (answer: ActionAnswer): string | undefined => (answer.result as { code?: string } | undefined)?.code;
const roleOf = async (team: Team, userId: string) =>
  (await getMember({ workspaceId: team.project.workspaceId, userId }))?.role;

async function getPage(url: string, cookie?: string): Promise<{ status: number; html: string }> {
  const res = await fetch(`${appUrl()}${url}`, { headers: cookie ? { cookie } : {}, redirect: 'manual' });
  return { status: res.status, html: await res.text() };
}

const INVITE_LINK = /\/invite\/([A-Za-z0-9_-]{43})/;

/** Invites an address through the members action and returns the secret from the mail that arrived (not one seen before). */
async function inviteByMail(team: Team, email: string, role = 'viewer', seen: string[] = []): Promise<string> {
  const answer = await membersAction(team, 'inviteMemberAction', { email, role });
  expect(codeOf(answer)).toBe('ok');
  const mail = await waitForMail((m) => {
    const secret = INVITE_LINK.exec(m.text)?.[1];
    return m.to.includes(email) && secret !== undefined && !seen.includes(secret);
  });
  return INVITE_LINK.exec(mail.text)![1]!;
}

function join(secret: string, password = `pw-${randomUUID()}`): Promise<ActionAnswer> {
  return callAction({
    key: JOIN,
    page: `/invite/${secret}`,
    args: formArgs({ token: secret, name: 'Tamsin Reed', password, confirm: password }),
    headers: { 'x-forwarded-for': testAddress() },
  });
}

const DEAD_INVITATION = /expired, was revoked or was already used/;

describe('a workspace always keeps an admin', () => {
  it('refuses to demote the only admin, and the role stays admin', async () => {
    const team = await newTeam();
    const answer = await membersAction(team, 'changeRoleAction', { userId: team.admin.id, role: 'maintainer' });
    expect(codeOf(answer)).toBe('conflict:last_admin');
    expect(await roleOf(team, team.admin.id)).toBe('admin');
  });

  it('refuses to remove the only admin, even when they remove themselves', async () => {
    const team = await newTeam();
    const answer = await membersAction(team, 'removeMemberAction', { userId: team.admin.id });
    expect(codeOf(answer)).toBe('conflict:last_admin');
    expect(await roleOf(team, team.admin.id)).toBe('admin');
  });

  it('lets an admin step down once someone else is admin', async () => {
    const team = await newTeam();
    const other = await createTestUser({ workspaceId: team.project.workspaceId, role: 'maintainer' });
    expect(codeOf(await membersAction(team, 'changeRoleAction', { userId: other.id, role: 'admin' }))).toBe('ok');
    expect(codeOf(await membersAction(team, 'changeRoleAction', { userId: team.admin.id, role: 'viewer' }))).toBe('ok');
    expect(await roleOf(team, team.admin.id)).toBe('viewer');
    expect(await roleOf(team, other.id)).toBe('admin');
  });

  it('two admins demoting each other at the same moment end with exactly one admin', async () => {
    // Without the lock both requests would count two admins and both would succeed.
    for (let round = 0; round < 4; round++) {
      const team = await newTeam();
      const second = await createTestUser({ workspaceId: team.project.workspaceId, role: 'admin' });
      const secondCookie = await signInCookie(second, testAddress());
      const answers = await Promise.all([
        membersAction(team, 'changeRoleAction', { userId: second.id, role: 'viewer' }),
        membersAction(team, 'changeRoleAction', { userId: team.admin.id, role: 'viewer' }, secondCookie),
      ]);
      const codes = answers.map(codeOf);
      expect(codes.filter((c) => c === 'ok')).toHaveLength(1);
      // The loser is either already demoted (no longer admin) or would demote the last admin.
      expect(codes.find((c) => c !== 'ok')).toMatch(/^(forbidden:role|conflict:last_admin)$/);
      expect(await countAdmins({ workspaceId: team.project.workspaceId })).toBe(1);
    }
  });

  it("refuses a removal named with another workspace's member id, as if the member did not exist", async () => {
    const team = await newTeam();
    const elsewhere = await newTeam();
    const stranger = await createTestUser({ workspaceId: elsewhere.project.workspaceId, role: 'viewer' });
    const answer = await membersAction(team, 'removeMemberAction', { userId: stranger.id });
    expect(codeOf(answer)).toBe('not_found:member');
    expect(await getMember({ workspaceId: elsewhere.project.workspaceId, userId: stranger.id })).toBeDefined();
  });
});

describe('invitations', () => {
  let team: Team;
  beforeAll(async () => {
    team = await newTeam();
  });

  it('mails a link that works once: it creates the account with the invited role, then is dead', async () => {
    const email = `newcomer-${randomUUID().slice(0, 8)}@saltings.example`;
    const secret = await inviteByMail(team, email, 'maintainer');
    const page = await getPage(`/invite/${secret}`);
    expect(page.status).toBe(200);
    expect(page.html).toContain('You are invited as');
    const first = await join(secret);
    expect(first.redirect).toContain(`/w/${team.slug}`);
    const members =
      await getSql()`select m.role from memberships m join users u on u.id = m.user_id where u.email = ${email} and m.workspace_id = ${team.project.workspaceId}`;
    expect(members.map((r) => r.role)).toEqual(['maintainer']);
    const again = await join(secret);
    expect(again.redirect).toBeNull();
    expect((again.result as { message?: string }).message).toMatch(DEAD_INVITATION);
    expect((await getPage(`/invite/${secret}`)).html).toMatch(DEAD_INVITATION);
  });

  it('refuses an invitation whose expiry has passed, on the page and in the join action', async () => {
    const email = `latecomer-${randomUUID().slice(0, 8)}@saltings.example`;
    const secret = await inviteByMail(team, email);
    await getSql()`update invitations set expires_at = now() - interval '1 minute' where email = ${email}`;
    expect((await getPage(`/invite/${secret}`)).html).toMatch(DEAD_INVITATION);
    const answer = await join(secret);
    expect(answer.redirect).toBeNull();
    expect((answer.result as { message?: string }).message).toMatch(DEAD_INVITATION);
    const users = await getSql()`select id from users where email = ${email}`;
    expect(users).toHaveLength(0);
  });

  it('stops a revoked invitation from working and takes it off the pending list', async () => {
    const email = `withdrawn-${randomUUID().slice(0, 8)}@saltings.example`;
    const secret = await inviteByMail(team, email);
    const pending = (await listPendingInvitationRows({ workspaceId: team.project.workspaceId })).find(
      (i) => i.email === email,
    );
    expect(pending).toBeDefined();
    expect(codeOf(await membersAction(team, 'revokeInvitationAction', { invitationId: pending!.id }))).toBe('ok');
    expect(
      (await listPendingInvitationRows({ workspaceId: team.project.workspaceId })).some((i) => i.email === email),
    ).toBe(false);
    expect((await join(secret)).redirect).toBeNull();
  });

  it('keeps only the newest link working when the same address is invited twice', async () => {
    const email = `twice-${randomUUID().slice(0, 8)}@saltings.example`;
    const older = await inviteByMail(team, email);
    const newer = await inviteByMail(team, email, 'viewer', [older]);
    expect((await getPage(`/invite/${older}`)).html).toMatch(DEAD_INVITATION);
    expect((await getPage(`/invite/${newer}`)).html).toContain('You are invited as');
  });

  it('says so when the invitation mail cannot be delivered, instead of failing the page', async () => {
    const email = `bounce+smtpfail-${randomUUID().slice(0, 6)}@saltings.example`;
    const answer = await membersAction(team, 'inviteMemberAction', { email, role: 'viewer' });
    expect(answer.status).toBe(200);
    expect(codeOf(answer)).toBe('unavailable:mail');
    expect((answer.result as { values?: { email?: string } }).values?.email).toBe(email);
  });

  it('refuses to invite someone who is already a member (their role is changed in the list instead)', async () => {
    const member = await createTestUser({ workspaceId: team.project.workspaceId, role: 'viewer' });
    const answer = await membersAction(team, 'inviteMemberAction', { email: member.email, role: 'admin' });
    expect(codeOf(answer)).toBe('conflict:member');
    expect(await roleOf(team, member.id)).toBe('viewer');
  });
});

describe('audit log', () => {
  it('records every privileged change with the acting admin, newest first on the audit page', async () => {
    const team = await newTeam();
    const target = await createTestUser({ workspaceId: team.project.workspaceId, role: 'viewer' });
    const leaver = await createTestUser({ workspaceId: team.project.workspaceId, role: 'viewer' });
    const invitee = `audited-${randomUUID().slice(0, 8)}@saltings.example`;
    expect(codeOf(await membersAction(team, 'changeRoleAction', { userId: target.id, role: 'maintainer' }))).toBe('ok');
    expect(codeOf(await membersAction(team, 'removeMemberAction', { userId: leaver.id }))).toBe('ok');
    await inviteByMail(team, invitee);
    const invitation = (await listPendingInvitationRows({ workspaceId: team.project.workspaceId })).find(
      (i) => i.email === invitee,
    )!;
    expect(codeOf(await membersAction(team, 'revokeInvitationAction', { invitationId: invitation.id }))).toBe('ok');
    const created = await callAction({
      key: `${TOKENS}#createTokenAction`,
      page: `/w/${team.slug}/settings/tokens`,
      args: formArgs({ workspace: team.slug, projectId: team.project.projectId, name: 'audited token' }),
      cookie: team.cookie,
    });
    expect(codeOf(created)).toBe('ok');
    const rows = await getSql()`
      select a.action, u.email as actor from audit_events a left join users u on u.id = a.actor_user_id
      where a.workspace_id = ${team.project.workspaceId} and a.actor_user_id is not null order by a.id`;
    expect(rows.map((r) => r.action)).toEqual([
      'member.role',
      'member.remove',
      'member.invite',
      'invitation.revoke',
      'token.create',
    ]);
    expect(new Set(rows.map((r) => r.actor))).toEqual(new Set([team.admin.email]));

    const page = await getPage(`/w/${team.slug}/settings/audit`, team.cookie);
    expect(page.status).toBe(200);
    const order = ['Created CI token', 'Revoked the invitation of', 'Invited', 'Removed', 'Changed the role of'].map(
      (text) => page.html.indexOf(text),
    );
    expect(order.every((at) => at > 0)).toBe(true);
    expect([...order].sort((a, b) => a - b)).toEqual(order);
  });

  it('is for admins only: maintainers and viewers get the same 404 as strangers', async () => {
    const team = await newTeam();
    for (const role of ['maintainer', 'viewer'] as const) {
      const user = await createTestUser({ workspaceId: team.project.workspaceId, role });
      const page = await getPage(`/w/${team.slug}/settings/audit`, await signInCookie(user, testAddress()));
      expect(page.status).toBe(404);
    }
  });

  it('pages through older events fifty at a time without repeating any', async () => {
    const team = await newTeam();
    for (let i = 1; i <= 60; i++) {
      await insertAuditEvent({
        workspaceId: team.project.workspaceId,
        actorUserId: team.admin.id,
        action: 'member.invite',
        targetType: 'invitation',
        details: { email: `p${i}-x@saltings.example`, role: 'viewer' },
      });
    }
    const first = await getPage(`/w/${team.slug}/settings/audit`, team.cookie);
    const rowsOf = (html: string) => html.split('data-testid="audit-row"').length - 1;
    expect(rowsOf(first.html)).toBe(50);
    expect(first.html.indexOf('p60-x@')).toBeLessThan(first.html.indexOf('p59-x@'));
    expect(first.html).not.toContain('p10-x@');
    const older = /href="([^"]*\?before=\d+)"/.exec(first.html);
    expect(older).not.toBeNull();
    const second = await getPage(older![1]!.replace(/&amp;/g, '&'), team.cookie);
    // The other 10 invitations and the token made with the workspace.
    expect(rowsOf(second.html)).toBe(11);
    expect(second.html).toContain('p10-x@');
    expect(second.html).not.toContain('p11-x@');
    expect(second.html).not.toMatch(/href="[^"]*\?before=\d+"/);
  });
});
