import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { launchBrowser, screenshot } from '../support/browser';
import { createTestProject, fixturePath, postRun, waitForRun, type TestProject } from '../support/api';
import { appUrl } from '../support/env';
import { createTestUser, signInPage, type TestUser } from '../support/users';

const laxWendroff = fixturePath('snapshots', 'tophat-lax-wendroff.csv');
const vanLeer = fixturePath('snapshots', 'tophat-van-leer.csv');
const periodic = { variableOptions: { u: { periodic: { x: true }, velocitySign: 1 } } };

describe('overview, project and build pages in Chromium', () => {
  let browser: Browser;
  let close: () => Promise<void>;
  let page: Page;
  let project: TestProject;
  let viewer: TestUser;
  let workspaceSlug: string;

  beforeAll(async () => {
    ({ browser, close } = await launchBrowser());
    project = await createTestProject('reedbank');
    // Night 1: both cases pass. Night 2: the limiter change breaks one of them.
    const n1 = [
      await postRun(
        project.token,
        { build: 'nightly-1', commit: 'aaaa1111', case: 'salt-front', manifest: periodic },
        { path: vanLeer },
      ),
      await postRun(
        project.token,
        { build: 'nightly-1', commit: 'aaaa1111', case: 'dye-plume', manifest: periodic },
        { path: vanLeer },
      ),
    ];
    for (const r of n1) await waitForRun(project.token, r.body.run.id);
    await new Promise((r) => setTimeout(r, 20)); // distinct start times
    const n2 = [
      await postRun(
        project.token,
        { build: 'nightly-2', commit: 'bbbb2222', case: 'salt-front', manifest: periodic },
        { path: laxWendroff },
      ),
      await postRun(
        project.token,
        { build: 'nightly-2', commit: 'bbbb2222', case: 'dye-plume', manifest: periodic },
        { path: vanLeer },
      ),
    ];
    for (const r of n2) await waitForRun(project.token, r.body.run.id);
    viewer = await createTestUser({ workspaceId: project.workspaceId, role: 'viewer' });
    page = await browser.newPage({ viewport: { width: 1280, height: 900 } });
    await signInPage(page, viewer);
    workspaceSlug = project.workspaceSlug;
    await page.goto(`${appUrl()}/`);
  });
  afterAll(async () => {
    await close();
  });

  it('lands a signed-in viewer on the overview, which lists the failing build with its worst finding', async () => {
    await page.waitForURL(`${appUrl()}/w/${workspaceSlug}`);
    const rows = page.getByTestId('overview-builds').locator('tbody tr');
    await expect(rows.count()).resolves.toBe(1);
    const text = (await rows.first().textContent()) ?? '';
    expect(text).toContain('nightly-2');
    expect(text).toContain('1 / 2');
    expect(text).toMatch(/TV grew/);
    await screenshot(page, 'overview');
  });

  it('filters the overview by verdict through the form', async () => {
    await page.getByLabel('Verdict').selectOption('pass');
    await Promise.all([page.waitForURL(/verdict=pass/), page.getByRole('button', { name: 'Apply' }).click()]);
    const text = (await page.getByTestId('overview-builds').textContent()) ?? '';
    expect(text).toContain('nightly-1');
    expect(text).not.toContain('nightly-2');
  });

  it('shows the build with its cases and which case changed verdict since the previous build', async () => {
    await page.goto(`${appUrl()}/w/${workspaceSlug}/projects/reedbank/builds/nightly-2`);
    const cases = (await page.getByTestId('build-cases').textContent()) ?? '';
    expect(cases).toContain('salt-front');
    expect(cases).toContain('dye-plume');
    const changes = page.getByTestId('build-changes');
    expect(await changes.textContent()).toContain('salt-front');
    expect(
      await changes.locator('[data-verdict]').evaluateAll((els) => els.map((e) => e.getAttribute('data-verdict'))),
    ).toEqual(['pass', 'fail']);
    await screenshot(page, 'build');
  });

  it('shows the project with the case that started failing and the build where it started', async () => {
    await page.goto(`${appUrl()}/w/${workspaceSlug}/projects/reedbank`);
    const row = page.getByTestId('project-cases').locator('tr', { hasText: 'salt-front' });
    const text = (await row.textContent()) ?? '';
    expect(text).toContain('nightly-2');
    expect(text).toContain('started failing');
    await expect(page.getByTestId('pass-rate-chart').count()).resolves.toBe(1);
    // A viewer gets no settings control.
    await expect(page.getByRole('link', { name: 'Project settings' }).count()).resolves.toBe(0);
    await screenshot(page, 'project');
  });

  it("answers 404 for another workspace's project and build pages", async () => {
    const other = await createTestProject('hidden-fen');
    await postRun(other.token, { build: 'secret-1', case: 'c' }, { path: vanLeer });
    for (const path of [
      `/w/${other.workspaceSlug}`,
      `/w/${other.workspaceSlug}/projects/hidden-fen`,
      `/w/no-such-workspace`,
      `/w/${workspaceSlug}/projects/hidden-fen`,
      `/w/${workspaceSlug}/projects/hidden-fen/builds/secret-1`,
    ]) {
      const res = await page.goto(`${appUrl()}${path}`);
      expect(res?.status(), path).toBe(404);
    }
  });
});
