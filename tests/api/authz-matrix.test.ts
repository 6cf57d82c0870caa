/**
 * Authorisation matrix: every mutating route handler and every server action of the app, called
 * by six kinds of caller, with the answer each must get and whether the write happened.
 *
 * How the endpoints are found. The test scans the source: every `app/**\/route.ts` for exported
 * POST/PUT/PATCH/DELETE handlers, and every module with a file-level 'use server' directive (in
 * app/ and src/) for its exported functions. The scanned lists must equal the tables below, so a
 * new route or action fails this test until someone writes down who may call it. The build's
 * server-reference manifest (every action Next will accept) must also be covered by the table,
 * which catches anything the source scan might miss; an inline 'use server' inside a component
 * fails the test outright (such actions have no stable name to list).
 *
 * How the actions are called. Through HTTP, the way Next's client calls them (see
 * tests/support/actions.ts): POST to the page that uses the action with `Next-Action: <id from
 * the manifest>` and the arguments in React's reply encoding. The real server therefore reads
 * the real session cookie (actions use next/headers, which only exists inside a request), and no
 * check is mocked or bypassed. Calling the action module directly in vitest cannot work (no
 * request scope), and calling `authorizeMember` through a wrapper would test the wrapper, not
 * whether each action remembers to call it.
 *
 * Callers: nobody signed in, a viewer, a maintainer and an admin of the workspace, an admin of
 * another workspace (who names this workspace: it must look missing), and the project's CI
 * token (sent as `Authorization: Bearer`, which server actions never read, so for them it is the
 * same as nobody; for the API it is upload-and-read only).
 *
 * Every write is probed in the database afterwards: a refused call must leave no trace, an
 * allowed one must have done its work (so a refusal that still writes, or an "ok" that did
 * nothing, both fail).
 */
import { randomBytes, randomUUID } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { getDb } from '@/db/client';
import { auditEvents, runNotes, subscriptions } from '@/db/schema';
import { and, count, eq } from 'drizzle-orm';
import { getBuildByKey } from '@/src/server/queries/builds';
import { getCaseByName, getProjectBySlug } from '@/src/server/queries/projects';
import { ensureSubscription, getSubscription, getSubscriptionByEmail } from '@/src/server/queries/subscriptions';
import { getTokenById, listTokens } from '@/src/server/queries/tokens';
import {
  getInvitationById,
  getMember,
  getMembershipById,
  insertInvitation,
  listPendingInvitationRows,
} from '@/src/server/queries/users';
import { issueToken } from '@/src/server/services/tokens';
import { builtActions, callAction, formArgs, type ActionAnswer } from '../support/actions';
import { createTestProject, fixturePath, postRun, waitForRun, type TestProject } from '../support/api';
import { appUrl } from '../support/env';
import { createTestUser, signInCookie } from '../support/users';

const CALLERS = ['anonymous', 'viewer', 'maintainer', 'admin', 'outsider', 'token'] as const;
type Caller = (typeof CALLERS)[number];

interface Fixture {
  project: TestProject;
  workspace: string;
  caseName: string;
  doneRunId: string;
  cookies: Record<Caller, string | undefined>;
}

// ------------------------------------------------------------------------------- scanning

const root = process.cwd();
const MUTATING = ['POST', 'PUT', 'PATCH', 'DELETE'];

function sourceFiles(dir: string): string[] {
  return (fs.readdirSync(path.join(root, dir), { recursive: true }) as string[])
    .filter((f) => /\.(ts|tsx|js|mjs)$/.test(f) && !f.includes('node_modules'))
    .map((f) => path.join(dir, f).split(path.sep).join('/'));
}

/** Names a module exports, from the export forms handlers and actions use. */
function exportedNames(source: string): string[] {
  const names: string[] = [];
  for (const m of source.matchAll(/export\s+(?:async\s+)?function\s*\*?\s*(\w+)/g)) names.push(m[1]!);
  for (const m of source.matchAll(/export\s+(?:const|let|var)\s+(\w+)/g)) names.push(m[1]!);
  for (const m of source.matchAll(/export\s+(?:const|let|var)\s*\{([^}]*)\}/g))
    names.push(...m[1]!.split(',').map((n) => n.split(':').pop()!.trim()));
  for (const m of source.matchAll(/export\s*\{([^}]*)\}/g))
    names.push(
      ...m[1]!.split(',').map((n) =>
        n
          .split(/\s+as\s+/)
          .pop()!
          .trim(),
      ),
    );
  return names.filter(Boolean);
}

function scanMutatingRoutes(): string[] {
  return sourceFiles('app')
    .filter((f) => /(^|\/)route\.(ts|tsx|js|mjs)$/.test(f))
    .flatMap((f) =>
      exportedNames(fs.readFileSync(path.join(root, f), 'utf8'))
        .filter((n) => MUTATING.includes(n))
        .map((n) => `${n} ${f}`),
    )
    .sort();
}

const hasFileLevelUseServer = (source: string): boolean =>
  /^(?:\s|\/\/[^\n]*\n|\/\*[\s\S]*?\*\/)*['"]use server['"]/.test(source);

function scanServerActions(): { actions: string[]; inline: string[] } {
  const actions: string[] = [];
  const inline: string[] = [];
  for (const f of [...sourceFiles('app'), ...sourceFiles('src')]) {
    const source = fs.readFileSync(path.join(root, f), 'utf8');
    if (hasFileLevelUseServer(source)) {
      actions.push(...exportedNames(source).map((n) => `${f}#${n}`));
    } else if (/['"]use server['"]/.test(source)) {
      inline.push(f);
    }
  }
  return { actions: actions.sort(), inline };
}

// ------------------------------------------------------------------------------- outcomes

/** What a caller got from an action, in the words of the table. */
type ActionOutcome = 'ok' | 'unauthorized' | 'forbidden' | 'not_found' | 'answered' | 'redirect' | `http ${number}`;

function actionOutcome(answer: ActionAnswer): ActionOutcome {
  if (answer.redirect) return 'redirect';
  if (answer.status !== 200) return `http ${answer.status}`;
  const r = answer.result;
  if (!r || typeof r !== 'object') return 'answered';
  const { code, message, ok, previewed } = r as {
    code?: unknown;
    message?: unknown;
    ok?: unknown;
    previewed?: unknown;
  };
  if (typeof code === 'string') {
    if (code === 'ok') return 'ok';
    const kind = code.split(':')[0];
    return kind === 'unauthorized' || kind === 'forbidden' || kind === 'not_found' ? kind : 'answered';
  }
  // Actions that answer without a code: authorizeMember's own messages tell the refusal.
  if (message === 'Sign in first.') return 'unauthorized';
  if (message === 'No such workspace.') return 'not_found';
  if (typeof message === 'string' && /^This needs the \w+ role/.test(message)) return 'forbidden';
  if (ok === true || previewed === true) return 'ok';
  return 'answered';
}

/** The page to post an action to: a page using it, with the fixture's names in its [params]. */
function pageFor(pages: string[], f: Fixture): string {
  const params: Record<string, string> = {
    workspace: f.workspace,
    project: f.project.slug,
    case: f.caseName,
    build: 'matrix-base',
    run: f.doneRunId,
    id: f.doneRunId,
    token: 'no-such-token',
  };
  const fill = (page: string): string | null => {
    const segments: string[] = [];
    for (const seg of page
      .replace(/^app/, '')
      .replace(/\/page$/, '')
      .split('/')) {
      if (/^\(.*\)$/.test(seg)) continue; // route groups are not in the URL
      const param = /^\[(\w+)\]$/.exec(seg);
      if (param && params[param[1]!] === undefined) return null;
      segments.push(param ? encodeURIComponent(params[param[1]!]!) : seg);
    }
    return segments.join('/') || '/';
  };
  for (const page of pages.filter((p) => p.startsWith('app/') && p.endsWith('/page'))) {
    const url = fill(page);
    if (url) return url;
  }
  throw new Error(`no page using this action has only known [params]: ${pages.join(', ')}`);
}

function credentials(f: Fixture, who: Caller): { cookie?: string; headers: Record<string, string> } {
  if (who === 'token') return { headers: { Authorization: `Bearer ${f.project.token}` } };
  return { cookie: f.cookies[who], headers: {} };
}

// ------------------------------------------------------------------------------- the tables

interface Prepared {
  /** The action's arguments (a FormData for form actions, an object for programmatic ones). */
  args: unknown[];
  /** Whether the write happened; absent for actions that write nothing. */
  wrote?: () => Promise<boolean>;
}

interface ActionRow {
  behaviour: string;
  prepare: (f: Fixture, who: Caller) => Promise<Prepared>;
  expect: Record<Caller, ActionOutcome>;
}

const ADMIN_ONLY: Record<Caller, ActionOutcome> = {
  anonymous: 'unauthorized',
  viewer: 'forbidden',
  maintainer: 'forbidden',
  admin: 'ok',
  outsider: 'not_found',
  token: 'unauthorized',
};
const MAINTAINERS: Record<Caller, ActionOutcome> = { ...ADMIN_ONLY, maintainer: 'ok' };
const MEMBERS: Record<Caller, ActionOutcome> = { ...MAINTAINERS, viewer: 'ok' };
const PUBLIC_FORM: Record<Caller, ActionOutcome> = {
  anonymous: 'answered',
  viewer: 'answered',
  maintainer: 'answered',
  admin: 'answered',
  outsider: 'answered',
  token: 'answered',
};

const DIGEST_TIMING = { digestDay: '1', digestHour: '8', timeZone: 'UTC' };
const unique = (who: Caller) => `${who}-${randomUUID().slice(0, 8)}`;
const emptyPolicyForm = () => ({ settings: {}, variables: [] });

async function freshMember(f: Fixture) {
  return createTestUser({ workspaceId: f.project.workspaceId, role: 'viewer' });
}

const ACTIONS: Record<string, ActionRow> = {
  'app/(app)/w/[workspace]/settings/members/actions.ts#changeRoleAction': {
    behaviour: "only the workspace's admins change a member's role",
    prepare: async (f) => {
      const target = await freshMember(f);
      return {
        args: formArgs({ workspace: f.workspace, userId: target.id, role: 'maintainer' }),
        wrote: async () =>
          (await getMember({ workspaceId: f.project.workspaceId, userId: target.id }))?.role === 'maintainer',
      };
    },
    expect: ADMIN_ONLY,
  },
  'app/(app)/w/[workspace]/settings/members/actions.ts#removeMemberAction': {
    behaviour: "only the workspace's admins remove a member",
    prepare: async (f) => {
      const target = await freshMember(f);
      return {
        args: formArgs({ workspace: f.workspace, userId: target.id }),
        wrote: async () => !(await getMember({ workspaceId: f.project.workspaceId, userId: target.id })),
      };
    },
    expect: ADMIN_ONLY,
  },
  'app/(app)/w/[workspace]/settings/members/actions.ts#inviteMemberAction': {
    behaviour: "only the workspace's admins invite people",
    prepare: async (f, who) => {
      const email = `invitee-${unique(who)}@fenwick.example`;
      return {
        args: formArgs({ workspace: f.workspace, email, role: 'viewer' }),
        wrote: async () =>
          (await listPendingInvitationRows({ workspaceId: f.project.workspaceId })).some((i) => i.email === email),
      };
    },
    expect: ADMIN_ONLY,
  },
  'app/(app)/w/[workspace]/settings/members/actions.ts#revokeInvitationAction': {
    behaviour: "only the workspace's admins revoke an invitation",
    prepare: async (f, who) => {
      const invitation = await insertInvitation({
        workspaceId: f.project.workspaceId,
        email: `pending-${unique(who)}@fenwick.example`,
        role: 'viewer',
        tokenHash: randomBytes(32).toString('hex'),
        invitedBy: null,
        expiresAt: new Date(Date.now() + 86_400_000),
      });
      return {
        args: formArgs({ workspace: f.workspace, invitationId: invitation.id }),
        wrote: async () =>
          Boolean((await getInvitationById({ workspaceId: f.project.workspaceId, id: invitation.id }))?.revokedAt),
      };
    },
    expect: ADMIN_ONLY,
  },
  'app/(app)/w/[workspace]/settings/tokens/actions.ts#createTokenAction': {
    behaviour: 'only maintainers and admins create CI tokens',
    prepare: async (f, who) => {
      const name = `matrix ${unique(who)}`;
      return {
        args: formArgs({ workspace: f.workspace, projectId: f.project.projectId, name }),
        wrote: async () => (await listTokens({ workspaceId: f.project.workspaceId })).some((t) => t.name === name),
      };
    },
    expect: MAINTAINERS,
  },
  'app/(app)/w/[workspace]/settings/tokens/actions.ts#revokeTokenAction': {
    behaviour: 'only maintainers and admins revoke CI tokens',
    prepare: async (f, who) => {
      const issued = await issueToken({
        workspaceId: f.project.workspaceId,
        projectId: f.project.projectId,
        name: `victim ${unique(who)}`,
      });
      return {
        args: formArgs({ workspace: f.workspace, tokenId: issued.id }),
        wrote: async () =>
          Boolean((await getTokenById({ workspaceId: f.project.workspaceId, id: issued.id }))?.revokedAt),
      };
    },
    expect: MAINTAINERS,
  },
  'app/(app)/w/[workspace]/projects/[project]/settings/actions.ts#saveProjectSettingsAction': {
    behaviour: "only maintainers and admins change a project's settings",
    prepare: async (f, who) => {
      const name = `Matrix project ${unique(who)}`;
      return {
        args: [
          { workspace: f.workspace, project: f.project.slug, name, defaultBranch: 'main', values: emptyPolicyForm() },
        ],
        wrote: async () =>
          (await getProjectBySlug({ workspaceId: f.project.workspaceId, slug: f.project.slug }))?.name === name,
      };
    },
    expect: MAINTAINERS,
  },
  'app/(app)/w/[workspace]/projects/[project]/cases/[case]/actions.ts#saveCasePolicyAction': {
    behaviour: "only maintainers and admins change a case's policy",
    prepare: async (f, who) => {
      const allow = String(CALLERS.indexOf(who) + 11);
      return {
        args: [
          {
            workspace: f.workspace,
            project: f.project.slug,
            case: f.caseName,
            values: { settings: { 'newExtrema.allow': allow }, variables: [] },
          },
        ],
        wrote: async () => {
          const kase = await getCaseByName({
            workspaceId: f.project.workspaceId,
            projectId: f.project.projectId,
            name: f.caseName,
          });
          return JSON.stringify(kase?.policy ?? {}).includes(`"allow":${allow}`);
        },
      };
    },
    expect: MAINTAINERS,
  },
  'app/(app)/w/[workspace]/projects/[project]/cases/[case]/actions.ts#previewCasePolicyAction': {
    behaviour: 'only maintainers and admins preview a policy change (it reads run data)',
    prepare: async (f) => ({
      args: [{ workspace: f.workspace, project: f.project.slug, case: f.caseName, values: emptyPolicyForm() }],
    }),
    expect: MAINTAINERS,
  },
  'src/components/baseline/actions.ts#acceptBaselineAction': {
    behaviour: 'only maintainers and admins accept a run as the baseline from the web app',
    prepare: async (f) => {
      const before = await countAudit(f.project.workspaceId, 'baseline.accept');
      return {
        args: [
          { workspace: f.workspace, project: f.project.slug, case: f.caseName, runId: f.doneRunId, branch: 'main' },
        ],
        wrote: async () => (await countAudit(f.project.workspaceId, 'baseline.accept')) > before,
      };
    },
    expect: MAINTAINERS,
  },
  'app/(app)/w/[workspace]/runs/[run]/actions.ts#addRunNoteAction': {
    behaviour: 'every member, viewers included, annotates runs of their workspace',
    prepare: async (f) => {
      const before = await countRunNotes(f.doneRunId);
      return {
        args: formArgs({ workspace: f.workspace, runId: f.doneRunId, body: 'reran with half the time step' }),
        wrote: async () => (await countRunNotes(f.doneRunId)) > before,
      };
    },
    expect: MEMBERS,
  },
  'app/(app)/w/[workspace]/settings/notifications/actions.ts#saveMySubscriptionAction': {
    behaviour: 'every member, viewers included, sets their own digest subscription',
    prepare: async (f) => {
      const before = await countSubscriptions(f.project.workspaceId);
      return {
        args: formArgs({
          workspace: f.workspace,
          projectId: f.project.projectId,
          weeklyDigest: 'on',
          ...DIGEST_TIMING,
        }),
        wrote: async () => (await countSubscriptions(f.project.workspaceId)) > before,
      };
    },
    expect: MEMBERS,
  },
  'app/(app)/w/[workspace]/settings/notifications/actions.ts#sendPreviewAction': {
    behaviour: 'every member may mail themselves a digest preview',
    prepare: async (f) => ({
      args: formArgs({ workspace: f.workspace, projectId: f.project.projectId, timeZone: 'UTC' }),
    }),
    expect: MEMBERS,
  },
  'app/(app)/w/[workspace]/settings/notifications/actions.ts#saveMailingListAction': {
    behaviour: 'only maintainers and admins subscribe a mailing list',
    prepare: async (f, who) => {
      const email = `list-${unique(who)}@fenwick.example`;
      return {
        args: formArgs({
          workspace: f.workspace,
          projectId: f.project.projectId,
          email,
          weeklyDigest: 'on',
          ...DIGEST_TIMING,
        }),
        wrote: async () =>
          Boolean(
            await getSubscriptionByEmail({ workspaceId: f.project.workspaceId, projectId: f.project.projectId, email }),
          ),
      };
    },
    expect: MAINTAINERS,
  },
  'app/(app)/w/[workspace]/settings/notifications/actions.ts#removeMailingListAction': {
    behaviour: 'only maintainers and admins remove a mailing list',
    prepare: async (f, who) => {
      const list = await ensureSubscription({
        workspaceId: f.project.workspaceId,
        projectId: f.project.projectId,
        userId: null,
        email: `old-list-${unique(who)}@fenwick.example`,
        settings: { weeklyDigest: true, failureAlerts: false, digestDay: 1, digestHour: 8, timeZone: 'UTC' },
      });
      return {
        args: formArgs({ workspace: f.workspace, subscriptionId: list.id }),
        wrote: async () => !(await getSubscription({ workspaceId: f.project.workspaceId, id: list.id })),
      };
    },
    expect: MAINTAINERS,
  },
  'app/(app)/actions.ts#signOutAction': {
    behaviour: 'anyone may sign out; everyone is sent to the sign-in page',
    prepare: async () => ({ args: [] }),
    expect: {
      anonymous: 'redirect',
      viewer: 'redirect',
      maintainer: 'redirect',
      admin: 'redirect',
      outsider: 'redirect',
      token: 'redirect',
    },
  },
  'app/(auth)/actions.ts#signInWithPassword': {
    behaviour: 'the password form is public and answers an empty form with field errors',
    prepare: async () => ({ args: formArgs({ email: '', password: '' }) }),
    expect: PUBLIC_FORM,
  },
  'app/(auth)/actions.ts#signInWithLink': {
    behaviour: 'the sign-in link form is public and refuses a made-up link',
    prepare: async () => ({ args: formArgs({ token: randomBytes(32).toString('base64url') }) }),
    expect: PUBLIC_FORM,
  },
  'app/(auth)/actions.ts#askForSignInLink': {
    behaviour: 'asking for a sign-in link is public',
    prepare: async () => ({ args: formArgs({ email: 'not an address' }) }),
    expect: PUBLIC_FORM,
  },
  'app/(auth)/actions.ts#askForPasswordReset': {
    behaviour: 'asking for a password reset is public',
    prepare: async () => ({ args: formArgs({ email: 'not an address' }) }),
    expect: PUBLIC_FORM,
  },
  'app/(auth)/actions.ts#chooseNewPassword': {
    behaviour: 'setting a new password needs a live reset link, whoever asks',
    prepare: async () => ({
      args: formArgs({
        token: randomBytes(32).toString('base64url'),
        password: 'long-enough-pass-1',
        confirm: 'long-enough-pass-1',
      }),
    }),
    expect: PUBLIC_FORM,
  },
  'app/(auth)/actions.ts#joinWorkspace': {
    behaviour: 'joining a workspace needs a live invitation, whoever asks',
    prepare: async () => ({
      args: formArgs({
        token: randomBytes(32).toString('base64url'),
        name: 'Ilse Marsh',
        password: 'long-enough-pass-1',
        confirm: 'long-enough-pass-1',
      }),
    }),
    expect: PUBLIC_FORM,
  },
};

interface RouteRow {
  behaviour: string;
  send: (f: Fixture, who: Caller) => Promise<{ status: number; wrote?: boolean }>;
  expect: Record<Caller, number>;
}

function withCredentials(req: request.Test, f: Fixture, who: Caller): request.Test {
  const c = credentials(f, who);
  // A browser attaches the page's Origin to every write; session writes without it are refused.
  if (c.cookie) req = req.set('Cookie', c.cookie).set('Origin', new URL(appUrl()).origin);
  for (const [k, v] of Object.entries(c.headers)) req = req.set(k, v);
  return req;
}

async function countAudit(workspaceId: string, action: string): Promise<number> {
  const [row] = await getDb()
    .select({ n: count() })
    .from(auditEvents)
    .where(and(eq(auditEvents.workspaceId, workspaceId), eq(auditEvents.action, action)));
  return row?.n ?? 0;
}

async function countRunNotes(runId: string): Promise<number> {
  const [row] = await getDb().select({ n: count() }).from(runNotes).where(eq(runNotes.runId, runId));
  return row?.n ?? 0;
}

async function countSubscriptions(workspaceId: string): Promise<number> {
  const [row] = await getDb()
    .select({ n: count() })
    .from(subscriptions)
    .where(eq(subscriptions.workspaceId, workspaceId));
  return row?.n ?? 0;
}

const vanLeer = fixturePath('snapshots', 'tophat-van-leer.csv');

const ROUTES: Record<string, RouteRow> = {
  'POST app/api/v1/runs/route.ts': {
    behaviour: "CI tokens, maintainers and admins post runs; viewers may not; another workspace's admin finds nothing",
    send: async (f, who) => {
      const build = `matrix-${unique(who)}`;
      const res = await withCredentials(request(appUrl()).post('/api/v1/runs'), f, who)
        .field('workspace', f.workspace)
        .field('project', f.project.slug)
        .field('build', build)
        .field('commit', 'c0ffee1')
        .field('branch', 'main')
        .field('case', 'matrix-upload')
        .attach('file', vanLeer);
      const wrote = Boolean(
        await getBuildByKey({ workspaceId: f.project.workspaceId, projectId: f.project.projectId, key: build }),
      );
      return { status: res.status, wrote };
    },
    expect: { anonymous: 401, viewer: 403, maintainer: 202, admin: 202, outsider: 404, token: 202 },
  },
  'POST app/api/v1/uploads/route.ts': {
    behaviour: 'presigned uploads follow the same rule as posting runs',
    send: async (f, who) => {
      const res = await withCredentials(request(appUrl()).post('/api/v1/uploads'), f, who).send({
        workspace: f.workspace,
        project: f.project.slug,
        fileName: 'matrix.csv',
        size: 1024,
        contentType: 'text/csv',
      });
      return { status: res.status };
    },
    expect: { anonymous: 401, viewer: 403, maintainer: 201, admin: 201, outsider: 404, token: 201 },
  },
  'POST app/api/v1/cases/[case]/baseline/route.ts': {
    behaviour: 'only signed-in maintainers and admins accept a baseline; a CI token is refused',
    send: async (f, who) => {
      const before = await countAudit(f.project.workspaceId, 'baseline.accept');
      const res = await withCredentials(request(appUrl()).post(`/api/v1/cases/${f.caseName}/baseline`), f, who).send({
        workspace: f.workspace,
        project: f.project.slug,
        run: f.doneRunId,
      });
      const wrote = (await countAudit(f.project.workspaceId, 'baseline.accept')) > before;
      return { status: res.status, wrote };
    },
    expect: { anonymous: 401, viewer: 403, maintainer: 200, admin: 200, outsider: 404, token: 403 },
  },
  'POST app/api/auth/[...nextauth]/route.ts': {
    behaviour: "next-auth's endpoints refuse a POST without its CSRF token, whoever sends it",
    send: async (f, who) => {
      const res = await withCredentials(request(appUrl()).post('/api/auth/callback/password'), f, who)
        .type('form')
        .send({ email: 'someone@fenwick.example', password: 'whatever-it-is' })
        .redirects(0);
      return { status: res.status === 302 && /MissingCSRF/.test(res.headers.location ?? '') ? 302 : res.status };
    },
    expect: { anonymous: 302, viewer: 302, maintainer: 302, admin: 302, outsider: 302, token: 302 },
  },
  'POST app/unsubscribe/one-click/route.ts': {
    behaviour: 'one-click unsubscribe trusts only its signed link, never a session or a CI token',
    send: async (f, who) => {
      const res = await withCredentials(
        request(appUrl()).post('/unsubscribe/one-click?token=not-a-signed-token'),
        f,
        who,
      )
        .type('form')
        .send({ 'List-Unsubscribe': 'One-Click' });
      return { status: res.status };
    },
    expect: { anonymous: 400, viewer: 400, maintainer: 400, admin: 400, outsider: 400, token: 400 },
  },
};

// ------------------------------------------------------------------------------- fixture

let fixture: Fixture;

beforeAll(async () => {
  const project = await createTestProject('matrix');
  const other = await createTestProject('matrix-elsewhere');
  const ip = (n: number) => `10.61.${Math.floor(Math.random() * 250)}.${n}`;
  const viewer = await createTestUser({ workspaceId: project.workspaceId, role: 'viewer' });
  const maintainer = await createTestUser({ workspaceId: project.workspaceId, role: 'maintainer' });
  const admin = await createTestUser({ workspaceId: project.workspaceId, role: 'admin' });
  const outsider = await createTestUser({ workspaceId: other.workspaceId, role: 'admin' });
  const workspace = (await getMembershipById({ userId: admin.id, workspaceId: project.workspaceId }))!.slug;
  const posted = await postRun(project.token, { build: 'matrix-base', case: 'matrix-case' }, { path: vanLeer });
  expect(posted.status).toBe(202);
  await waitForRun(project.token, posted.body.run.id);
  fixture = {
    project,
    workspace,
    caseName: 'matrix-case',
    doneRunId: posted.body.run.id,
    cookies: {
      anonymous: undefined,
      viewer: await signInCookie(viewer, ip(1)),
      maintainer: await signInCookie(maintainer, ip(2)),
      admin: await signInCookie(admin, ip(3)),
      outsider: await signInCookie(outsider, ip(4)),
      token: undefined,
    },
  };
});

// ------------------------------------------------------------------------------- tests

describe('the matrix covers every endpoint that changes something', () => {
  it('lists exactly the mutating route handlers found in app/**/route.ts', () => {
    expect(scanMutatingRoutes()).toEqual(Object.keys(ROUTES).sort());
  });

  it("lists exactly the server actions found in 'use server' modules", () => {
    const { actions } = scanServerActions();
    expect(actions).toEqual(Object.keys(ACTIONS).sort());
  });

  it("has no inline 'use server' functions, which would be actions with no name to list", () => {
    expect(scanServerActions().inline).toEqual([]);
  });

  it('lists every server action that the build accepts (the manifest of the tested build)', () => {
    const built = [...builtActions().keys()].sort();
    expect(built.filter((key) => !(key in ACTIONS))).toEqual([]);
  });
});

describe('server actions, called over HTTP as the browser does', () => {
  for (const [key, row] of Object.entries(ACTIONS)) {
    it(`${key.replace(/^app\//, '')}: ${row.behaviour}`, async () => {
      const built = builtActions().get(key);
      expect(built, `${key} is not in the build: is a page using it, and is the build fresh?`).toBeDefined();
      const page = pageFor(built!.pages, fixture);
      const outcomes = {} as Record<Caller, ActionOutcome>;
      const writes = {} as Record<Caller, boolean | null>;
      for (const who of CALLERS) {
        const prepared = await row.prepare(fixture, who);
        const c = credentials(fixture, who);
        const answer = await callAction({ key, page, args: prepared.args, cookie: c.cookie, headers: c.headers });
        outcomes[who] = actionOutcome(answer);
        writes[who] = prepared.wrote ? await prepared.wrote() : null;
      }
      expect(outcomes).toEqual(row.expect);
      const expectedWrites = Object.fromEntries(
        CALLERS.map((who) => [who, writes[who] === null ? null : row.expect[who] === 'ok']),
      );
      expect(writes).toEqual(expectedWrites);
    });
  }

  it('refuses a server action posted from another origin, and nothing is written', async () => {
    const key = 'app/(app)/w/[workspace]/settings/members/actions.ts#changeRoleAction';
    const target = await freshMember(fixture);
    const answer = await callAction({
      key,
      page: `/w/${fixture.workspace}/settings/members`,
      args: formArgs({ workspace: fixture.workspace, userId: target.id, role: 'admin' }),
      cookie: fixture.cookies.admin,
      origin: 'https://lure.example',
    });
    expect(answer.status).toBeGreaterThanOrEqual(400);
    expect((await getMember({ workspaceId: fixture.project.workspaceId, userId: target.id }))?.role).toBe('viewer');
  });
});

describe('route handlers that change something', () => {
  for (const [key, row] of Object.entries(ROUTES)) {
    it(`${key}: ${row.behaviour}`, async () => {
      const statuses = {} as Record<Caller, number>;
      const writes = {} as Record<Caller, boolean | null>;
      for (const who of CALLERS) {
        const { status, wrote } = await row.send(fixture, who);
        statuses[who] = status;
        writes[who] = wrote ?? null;
      }
      expect(statuses).toEqual(row.expect);
      const expectedWrites = Object.fromEntries(
        CALLERS.map((who) => [who, writes[who] === null ? null : row.expect[who] < 300]),
      );
      expect(writes).toEqual(expectedWrites);
    });
  }
});
