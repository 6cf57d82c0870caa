/**
 * Case policies, project settings and baselines through the services behind the web app's
 * forms (src/server/services/policies.ts), against the real database and the worker's stored
 * analysis; the viewer refusals also through the real server actions over HTTP.
 */
import { and, desc, eq } from 'drizzle-orm';
import { beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { getDb } from '@/db/client';
import { auditEvents, builds } from '@/db/schema';
import type { Role } from '@/src/server/auth/roles';
import type { MemberContext } from '@/src/server/auth/session';
import { AppError } from '@/src/server/errors';
import { getCaseByName, getProjectBySlug } from '@/src/server/queries/projects';
import { getRunContext, listRunFindings, listRunVariables } from '@/src/server/queries/runs';
import { getMembershipById } from '@/src/server/queries/users';
import {
  acceptBaselineAsMember,
  getBaselineComparison,
  previewCasePolicy,
  saveCasePolicy,
  saveProjectSettings,
} from '@/src/server/services/policies';
import type { PolicyFormValues } from '@/src/schemas/policy-form';
import { callAction } from '../support/actions';
import { createTestProject, fixturePath, postRun, waitForRun, type TestProject } from '../support/api';
import { appUrl } from '../support/env';
import { createTestUser, signInCookie } from '../support/users';

const laxWendroff = fixturePath('snapshots', 'tophat-lax-wendroff.csv');
const vanLeer = fixturePath('snapshots', 'tophat-van-leer.csv');

/** Off: TV growth and bounds; allow: new extrema. Enough to let the dispersive top hat pass. */
const LOOSE: PolicyFormValues = {
  settings: { 'tvGrowth.check': 'off', 'newExtrema.allow': '100', 'bounds.check': 'off' },
  variables: [],
};

interface Setup {
  project: TestProject;
  workspace: string;
  members: Record<Role, MemberContext>;
  cookies: Record<'viewer' | 'maintainer', string>;
}

async function member(
  project: TestProject,
  workspace: string,
  role: Role,
): Promise<{ ctx: MemberContext; cookie: string }> {
  const user = await createTestUser({ workspaceId: project.workspaceId, role });
  const ctx: MemberContext = {
    user: { id: user.id, email: user.email, name: null },
    workspace: { id: project.workspaceId, slug: workspace, name: workspace },
    role,
  };
  return { ctx, cookie: role === 'admin' ? '' : await signInCookie(user) };
}

async function setUp(): Promise<Setup> {
  const project = await createTestProject();
  const admin = await createTestUser({ workspaceId: project.workspaceId, role: 'admin' });
  const workspace = (await getMembershipById({ userId: admin.id, workspaceId: project.workspaceId }))!.slug;
  const [viewer, maintainer, owner] = await Promise.all([
    member(project, workspace, 'viewer'),
    member(project, workspace, 'maintainer'),
    member(project, workspace, 'admin'),
  ]);
  return {
    project,
    workspace,
    members: { viewer: viewer.ctx, maintainer: maintainer.ctx, admin: owner.ctx },
    cookies: { viewer: viewer.cookie, maintainer: maintainer.cookie },
  };
}

/** Posts a fixture as a CI job would and waits for its verdict. */
async function analysedRun(
  project: TestProject,
  caseName: string,
  file: string,
  build: string,
  branch = 'main',
): Promise<string> {
  const posted = await postRun(project.token, { build, case: caseName, branch }, { path: file });
  expect(posted.status).toBe(202);
  await waitForRun(project.token, posted.body.run.id);
  return posted.body.run.id as string;
}

async function storedState(s: Setup, runId: string, caseName: string) {
  const ws = s.project.workspaceId;
  const ctx = (await getRunContext({ workspaceId: ws, id: runId }))!;
  const kase = await getCaseByName({ workspaceId: ws, projectId: s.project.projectId, name: caseName });
  const [build] = await getDb().select({ verdict: builds.verdict }).from(builds).where(eq(builds.id, ctx.run.buildId));
  return {
    verdict: ctx.run.verdict,
    runPolicy: ctx.run.policy,
    finishedAt: ctx.run.finishedAt?.toISOString(),
    findings: (await listRunFindings({ workspaceId: ws, runId })).map((f) => f.id).sort(),
    variables: (await listRunVariables({ workspaceId: ws, runId })).map((v) => v.id).sort(),
    casePolicy: kase?.policy,
    buildVerdict: build?.verdict,
    audit: await auditCount(ws),
  };
}

async function auditCount(workspaceId: string): Promise<number> {
  return (
    await getDb().select({ id: auditEvents.id }).from(auditEvents).where(eq(auditEvents.workspaceId, workspaceId))
  ).length;
}

async function lastAudit(workspaceId: string, action: string) {
  const [row] = await getDb()
    .select()
    .from(auditEvents)
    .where(and(eq(auditEvents.workspaceId, workspaceId), eq(auditEvents.action, action)))
    .orderBy(desc(auditEvents.id))
    .limit(1);
  return row;
}

function appErrorOf(err: unknown): AppError {
  expect(err).toBeInstanceOf(AppError);
  return err as AppError;
}

describe('case policy preview and save', () => {
  let s: Setup;
  let runId: string;
  const caseName = 'tophat-dispersive';

  beforeAll(async () => {
    s = await setUp();
    runId = await analysedRun(s.project, caseName, laxWendroff, 'nightly-701');
  });

  it('preview re-judges the latest run with the candidate policy and changes no stored data', async () => {
    const before = await storedState(s, runId, caseName);
    expect(before.verdict).toBe('fail');
    const preview = await previewCasePolicy(s.members.maintainer, {
      projectSlug: s.project.slug,
      caseName,
      values: LOOSE,
    });
    expect(preview).not.toBeNull();
    expect(preview!.run).toMatchObject({ id: runId, buildKey: 'nightly-701', verdict: 'fail' });
    expect(preview!.verdict).toBe('pass');
    expect(preview!.findings.filter((f) => f.severity === 'fail')).toEqual([]);
    expect(await storedState(s, runId, caseName)).toEqual(before);
  });

  it('preview with the stored policy gives the stored verdict and findings (re-judging from summaries is faithful)', async () => {
    const preview = await previewCasePolicy(s.members.maintainer, {
      projectSlug: s.project.slug,
      caseName,
      values: { settings: {}, variables: [] },
    });
    const stored = await listRunFindings({ workspaceId: s.project.workspaceId, runId });
    expect(preview!.verdict).toBe('fail');
    expect(preview!.findings.map((f) => f.message).sort()).toEqual(stored.map((f) => f.message).sort());
  });

  it('refuses an invalid policy with errors per field and stores nothing', async () => {
    const before = await storedState(s, runId, caseName);
    const values: PolicyFormValues = {
      settings: { 'tvGrowth.failRelative': '-1', 'newExtrema.allow': '1.5', 'conservation.warnRelative': '1e-3' },
      variables: [{ name: 'u', settings: { 'bounds.lower': '1', 'bounds.upper': '0' } }],
    };
    const err = appErrorOf(
      await saveCasePolicy(s.members.maintainer, {
        projectSlug: s.project.slug,
        caseName,
        values,
        rejudge: true,
      }).catch((e: unknown) => e),
    );
    expect(err.code).toBe('invalid:policy');
    const { fieldErrors } = err.details as { fieldErrors: Record<string, string[]> };
    expect(Object.keys(fieldErrors).sort()).toEqual([
      'conservation.warnRelative',
      'newExtrema.allow',
      'tvGrowth.failRelative',
      'variables.0.bounds.lower',
    ]);
    expect(fieldErrors['tvGrowth.failRelative']).toEqual(['Must not be negative.']);
    await expect(
      previewCasePolicy(s.members.maintainer, { projectSlug: s.project.slug, caseName, values }),
    ).rejects.toMatchObject({ code: 'invalid:policy' });
    expect(await storedState(s, runId, caseName)).toEqual(before);
  });

  it('refuses a viewer at the service, whatever the caller checked', async () => {
    const before = await storedState(s, runId, caseName);
    await expect(
      saveCasePolicy(s.members.viewer, { projectSlug: s.project.slug, caseName, values: LOOSE, rejudge: true }),
    ).rejects.toMatchObject({ code: 'forbidden:role' });
    await expect(
      previewCasePolicy(s.members.viewer, { projectSlug: s.project.slug, caseName, values: LOOSE }),
    ).rejects.toMatchObject({ code: 'forbidden:role' });
    expect(await storedState(s, runId, caseName)).toEqual(before);
  });

  it("refuses a viewer's call of the save and preview actions over HTTP, leaving no trace", async () => {
    const before = await storedState(s, runId, caseName);
    const page = `/w/${s.workspace}/projects/${s.project.slug}/cases/${caseName}`;
    const input = { workspace: s.workspace, project: s.project.slug, case: caseName, values: LOOSE, rejudge: true };
    for (const name of ['saveCasePolicyAction', 'previewCasePolicyAction']) {
      const answer = await callAction({
        key: `app/(app)/w/[workspace]/projects/[project]/cases/[case]/actions.ts#${name}`,
        page,
        args: [input],
        cookie: s.cookies.viewer,
      });
      expect(answer.status, name).toBe(200);
      expect(answer.result, name).toMatchObject({ message: 'This needs the maintainer role; you are viewer.' });
      expect((answer.result as { preview?: unknown }).preview, name).toBeUndefined();
    }
    expect(await storedState(s, runId, caseName)).toEqual(before);
  });

  it('save stores only the case-level settings, re-judges the latest run (findings replaced, build verdict refreshed) and writes an audit event', async () => {
    const before = await storedState(s, runId, caseName);
    const saved = await saveCasePolicy(s.members.maintainer, {
      projectSlug: s.project.slug,
      caseName,
      values: LOOSE,
      rejudge: true,
    });
    expect(saved.policy).toEqual({ tvGrowth: { check: 'off' }, newExtrema: { allow: 100 }, bounds: { check: 'off' } });
    expect(saved.rejudged).toEqual({ runId, before: 'fail', after: 'pass' });

    const after = await storedState(s, runId, caseName);
    expect(after.casePolicy).toEqual(saved.policy);
    expect(after.verdict).toBe('pass');
    expect(after.buildVerdict).toBe('pass');
    expect(after.runPolicy).toMatchObject({
      tvGrowth: { check: 'off' },
      newExtrema: { allow: 100 },
      bounds: { check: 'off' },
    });
    // Findings replaced: none of the old rows is left; the variables (summaries) are kept as they were.
    expect(after.findings.filter((id) => before.findings.includes(id))).toEqual([]);
    expect(after.variables.length).toBe(before.variables.length);
    const [variable] = await listRunVariables({ workspaceId: s.project.workspaceId, runId });
    expect(variable!.series).toBeDefined();

    const audit = await lastAudit(s.project.workspaceId, 'case.policy.update');
    expect(audit).toMatchObject({ actorUserId: s.members.maintainer.user.id, targetType: 'case' });
    expect(audit!.details).toMatchObject({
      case: caseName,
      before: {},
      after: saved.policy,
      rejudged: { runId, before: 'fail', after: 'pass' },
    });

    const report = await request(appUrl())
      .get(`/api/v1/runs/${runId}`)
      .set('Authorization', `Bearer ${s.project.token}`);
    expect(report.body.run.verdict).toBe('pass');
  });

  it('save without re-judging leaves the run alone but still audits; the next upload is judged with the new policy', async () => {
    const strict: PolicyFormValues = { settings: {}, variables: [] };
    const before = await storedState(s, runId, caseName);
    const saved = await saveCasePolicy(s.members.maintainer, {
      projectSlug: s.project.slug,
      caseName,
      values: strict,
      rejudge: false,
    });
    expect(saved.rejudged).toBeNull();
    const after = await storedState(s, runId, caseName);
    expect(after.verdict).toBe(before.verdict);
    expect(after.findings).toEqual(before.findings);
    expect(after.casePolicy).toEqual({});
    expect(after.audit).toBe(before.audit + 1);
    const next = await analysedRun(s.project, caseName, laxWendroff, 'nightly-702');
    expect((await getRunContext({ workspaceId: s.project.workspaceId, id: next }))!.run.verdict).toBe('fail');
  });

  it('a case without an analysed run previews nothing and saves without re-judging', async () => {
    const fresh = 'tophat-not-yet-run';
    const { ensureCase } = await import('@/src/server/queries/projects');
    await ensureCase({ workspaceId: s.project.workspaceId, projectId: s.project.projectId, name: fresh });
    expect(
      await previewCasePolicy(s.members.maintainer, { projectSlug: s.project.slug, caseName: fresh, values: LOOSE }),
    ).toBeNull();
    const saved = await saveCasePolicy(s.members.maintainer, {
      projectSlug: s.project.slug,
      caseName: fresh,
      values: LOOSE,
      rejudge: true,
    });
    expect(saved.rejudged).toBeNull();
  });

  it('answers not found for a case of another workspace', async () => {
    const other = await setUp();
    await expect(
      previewCasePolicy(other.members.maintainer, { projectSlug: s.project.slug, caseName, values: LOOSE }),
    ).rejects.toMatchObject({ code: 'not_found:case' });
  });
});

describe('project settings', () => {
  let s: Setup;
  beforeAll(async () => {
    s = await setUp();
  });

  it('stores name, default branch and the default policy, and audits the change', async () => {
    await saveProjectSettings(s.members.maintainer, {
      projectSlug: s.project.slug,
      name: 'Saltmarsh tracer model (renamed)',
      defaultBranch: 'trunk',
      values: {
        settings: { 'conservation.check': 'warn', 'baseline.margin': '0.25' },
        variables: [{ name: 'salinity', settings: { 'bounds.lower': '0' } }],
      },
    });
    const project = (await getProjectBySlug({ workspaceId: s.project.workspaceId, slug: s.project.slug }))!;
    expect(project.name).toBe('Saltmarsh tracer model (renamed)');
    expect(project.defaultBranch).toBe('trunk');
    expect(project.defaultPolicy).toEqual({
      conservation: { check: 'warn' },
      baseline: { margin: 0.25 },
      variables: { salinity: { bounds: { lower: 0 } } },
    });
    const audit = await lastAudit(s.project.workspaceId, 'project.settings.update');
    expect(audit!.details).toMatchObject({ after: { defaultBranch: 'trunk' }, before: { defaultBranch: 'main' } });
  });

  it('refuses an invalid default policy with field errors, and a viewer', async () => {
    const err = appErrorOf(
      await saveProjectSettings(s.members.maintainer, {
        projectSlug: s.project.slug,
        name: 'x',
        defaultBranch: 'main',
        values: { settings: { 'baseline.margin': 'ten percent' }, variables: [] },
      }).catch((e: unknown) => e),
    );
    expect(err.code).toBe('invalid:policy');
    expect((err.details as { fieldErrors: Record<string, string[]> }).fieldErrors).toEqual({
      'baseline.margin': ['Enter a number, e.g. 0.5 or 1e-9.'],
    });
    await expect(
      saveProjectSettings(s.members.viewer, {
        projectSlug: s.project.slug,
        name: 'x',
        defaultBranch: 'main',
        values: { settings: {}, variables: [] },
      }),
    ).rejects.toMatchObject({
      code: 'forbidden:role',
    });
  });
});

describe('accepting a baseline from the web app', () => {
  let s: Setup;
  const caseName = 'tophat-monotone';
  let first: string;
  let second: string;

  beforeAll(async () => {
    s = await setUp();
    first = await analysedRun(s.project, caseName, vanLeer, 'nightly-801');
    second = await analysedRun(s.project, caseName, laxWendroff, 'nightly-802');
  });

  it('compares the candidate with the current baseline before anything is accepted', async () => {
    const none = await getBaselineComparison(s.members.viewer, {
      projectSlug: s.project.slug,
      caseName,
      runId: first,
      branch: 'main',
    });
    expect(none!.current).toBeNull();
    expect(none!.run.variables.map((v) => v.variable)).toEqual(['u']);
    await acceptBaselineAsMember(s.members.maintainer, {
      projectSlug: s.project.slug,
      caseName,
      runId: first,
      branch: 'main',
    });
    const cmp = await getBaselineComparison(s.members.viewer, {
      projectSlug: s.project.slug,
      caseName,
      runId: second,
      branch: 'main',
    });
    expect(cmp!.current).toMatchObject({ runId: first, buildKey: 'nightly-801', verdict: 'pass' });
    expect(cmp!.isCurrent).toBe(false);
    expect(cmp!.run.variables[0]!.metrics.maxNewExtrema).toBeGreaterThan(
      cmp!.current!.variables[0]!.metrics.maxNewExtrema,
    );
    const self = await getBaselineComparison(s.members.viewer, {
      projectSlug: s.project.slug,
      caseName,
      runId: first,
      branch: 'main',
    });
    expect(self!.isCurrent).toBe(true);
  });

  it('refuses a viewer at the service and through the action', async () => {
    await expect(
      acceptBaselineAsMember(s.members.viewer, {
        projectSlug: s.project.slug,
        caseName,
        runId: second,
        branch: 'main',
      }),
    ).rejects.toMatchObject({ code: 'forbidden:role' });
    const answer = await callAction({
      key: 'src/components/baseline/actions.ts#acceptBaselineAction',
      page: `/w/${s.workspace}/projects/${s.project.slug}/cases/${caseName}`,
      args: [{ workspace: s.workspace, project: s.project.slug, case: caseName, runId: second, branch: 'main' }],
      cookie: s.cookies.viewer,
    });
    expect(answer.result).toMatchObject({ message: 'This needs the maintainer role; you are viewer.' });
    const cmp = await getBaselineComparison(s.members.viewer, {
      projectSlug: s.project.slug,
      caseName,
      runId: first,
      branch: 'main',
    });
    expect(cmp!.isCurrent).toBe(true);
  });

  it('accepts through the action for a maintainer and records who did it', async () => {
    const answer = await callAction({
      key: 'src/components/baseline/actions.ts#acceptBaselineAction',
      page: `/w/${s.workspace}/projects/${s.project.slug}/cases/${caseName}`,
      args: [{ workspace: s.workspace, project: s.project.slug, case: caseName, runId: second, branch: 'main' }],
      cookie: s.cookies.maintainer,
    });
    expect(answer.result).toMatchObject({ ok: true });
    const cmp = await getBaselineComparison(s.members.viewer, {
      projectSlug: s.project.slug,
      caseName,
      runId: second,
      branch: 'main',
    });
    expect(cmp!.isCurrent).toBe(true);
    const audit = await lastAudit(s.project.workspaceId, 'baseline.accept');
    expect(audit).toMatchObject({ actorUserId: s.members.maintainer.user.id });
  });
});
