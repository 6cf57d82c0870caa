import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { getDb } from '@/db/client';
import { ensureBuild } from '@/src/server/queries/builds';
import { ensureCase } from '@/src/server/queries/projects';
import { insertRun, replaceRunResults } from '@/src/server/queries/runs';
import { getMembershipById } from '@/src/server/queries/users';
import { acceptBaseline } from '@/src/server/services/baselines';
import { launchBrowser, screenshot } from '../support/browser';
import { createTestProject, fixturePath, postRun, waitForRun, type TestProject } from '../support/api';
import { appUrl } from '../support/env';
import { createTestUser, signInPage, type TestUser } from '../support/users';

const laxWendroff = fixturePath('snapshots', 'tophat-lax-wendroff.csv');
const vanLeer = fixturePath('snapshots', 'tophat-van-leer.csv');
const square2d = fixturePath('snapshots', 'square-superbee-2d.csv');
const notNumeric = fixturePath('snapshots', 'not-numeric.csv');
const manifest = { variableOptions: { u: { periodic: { x: true }, velocitySign: 1 } } };

/** The number in "Step 12 · t = 0.3 (5 of 21)". */
async function shownStep(page: Page): Promise<number> {
  const text = (await page.getByTestId('step-label').textContent()) ?? '';
  const match = /Step (\d+)/.exec(text);
  if (!match) throw new Error(`no step in the label "${text}"`);
  return Number(match[1]);
}

async function waitForStepChange(page: Page, from: number): Promise<number> {
  await page.waitForFunction(
    (old) => {
      const m = /Step (\d+)/.exec(document.querySelector('[data-testid="step-label"]')?.textContent ?? '');
      return m !== null && Number(m[1]) !== old;
    },
    from,
    { timeout: 10_000 },
  );
  return shownStep(page);
}

/**
 * Signs in and waits until the landing overview has loaded. Opening another page while the
 * sign-in redirect was still under way gave a hydration failure (React error 418) in about half
 * of fresh browser contexts, on any page of the app; none once the landing page had loaded.
 */
async function signInSettled(page: Page, user: TestUser): Promise<void> {
  await signInPage(page, user);
  await page.waitForURL(/\/w\/[^/]+$/);
  await page.waitForLoadState('networkidle');
}

describe('run page in Chromium', () => {
  let browser: Browser;
  let close: () => Promise<void>;
  let page: Page;
  let project: TestProject;
  let viewer: TestUser;
  let workspace: string;
  let failingRun: string;
  let planeRun: string;
  let errorRun: string;
  let findings: { kind: string; step: number; message: string }[];
  /** Uncaught script errors (a failed hydration among them) would reset the theme and the charts. */
  const pageErrors: string[] = [];

  beforeAll(async () => {
    ({ browser, close } = await launchBrowser());
    project = await createTestProject('fenwater');
    // Night 1 passes with a limited scheme and becomes the baseline; night 2 switches to an unlimited one.
    const good = await postRun(
      project.token,
      { build: 'nightly-40', commit: 'c0ffee40', case: 'tophat-advection', manifest },
      { path: vanLeer },
    );
    await waitForRun(project.token, good.body.run.id);
    await acceptBaseline({
      actor: { workspaceId: project.workspaceId },
      projectId: project.projectId,
      caseName: 'tophat-advection',
      runId: good.body.run.id,
    });
    const bad = await postRun(
      project.token,
      { build: 'nightly-41', commit: 'c0ffee41', case: 'tophat-advection', manifest },
      { path: laxWendroff },
    );
    const plane = await postRun(
      project.token,
      { build: 'nightly-41', commit: 'c0ffee41', case: 'square-2d' },
      { path: square2d },
    );
    const broken = await postRun(
      project.token,
      { build: 'nightly-41', commit: 'c0ffee41', case: 'damaged-output' },
      { path: notNumeric },
    );
    const report = await waitForRun(project.token, bad.body.run.id);
    expect(report.run.verdict).toBe('fail');
    findings = report.findings;
    await waitForRun(project.token, plane.body.run.id);
    await waitForRun(project.token, broken.body.run.id);
    failingRun = bad.body.run.id;
    planeRun = plane.body.run.id;
    errorRun = broken.body.run.id;
    viewer = await createTestUser({ workspaceId: project.workspaceId, role: 'viewer' });
    workspace = (await getMembershipById({ userId: viewer.id, workspaceId: project.workspaceId }))!.slug;
    page = await browser.newPage({ viewport: { width: 1360, height: 1000 } });
    await signInSettled(page, viewer);
    page.on('pageerror', (e) => pageErrors.push(e.message));
  });
  afterAll(async () => {
    await close();
  });

  it('shows a failing 1D run: verdict, findings in words, the TV chart with band and baseline, and the field chart', async () => {
    const res = await page.goto(`${appUrl()}/w/${workspace}/runs/${failingRun}`);
    expect(res?.status()).toBe(200);
    await expect(page.getByTestId('run-case').textContent()).resolves.toBe('tophat-advection');
    await expect(page.locator('h1 [data-verdict]').getAttribute('data-verdict')).resolves.toBe('fail');
    const messages = await page.getByTestId('finding-message').allTextContents();
    expect(messages.length).toBe(findings.length);
    expect(messages.some((m) => /TV grew/.test(m))).toBe(true);

    const tvChart = page.getByTestId('tv-chart');
    await tvChart.locator('[data-series="baseline-tv"]').waitFor({ state: 'attached' });
    await expect(tvChart.locator('path[data-testid="series-line"]').count()).resolves.toBe(2);
    await expect(tvChart.locator('path[data-testid="series-band"]').count()).resolves.toBe(1);
    await expect(tvChart.locator('circle[data-testid="finding-marker"]').count()).resolves.toBeGreaterThan(0);

    const field = page.getByTestId('field-chart');
    await field.locator('[data-series="baseline"]').waitFor({ state: 'attached' });
    // this step, the previous one, the first one (unless the finding is at step 1) and the baseline's same step
    await expect(field.locator('path[data-testid="profile-line"]').count()).resolves.toBeGreaterThanOrEqual(3);
    await expect(page.getByTestId('checks-note').textContent()).resolves.toMatch(/does not validate the physics/);
    await expect(page.getByTestId('build-link').getAttribute('href')).resolves.toBe(
      `/w/${workspace}/projects/fenwater/builds/nightly-41`,
    );
    await screenshot(page, 'run-page-1d');
  });

  it('moves the step to a finding when it is clicked, zooming to its cells', async () => {
    const target = findings.find((f) => f.kind === 'new-extrema') ?? findings[0]!;
    const index = findings.indexOf(target);
    // Start somewhere else so the click has to move the step.
    await page.goto(`${appUrl()}/w/${workspace}/runs/${failingRun}?step=0`);
    await page.getByTestId('field-chart').waitFor({ state: 'attached' });
    expect(await shownStep(page)).toBe(0);
    await page.getByTestId('finding').nth(index).click();
    expect(await waitForStepChange(page, 0)).toBe(target.step);
    await expect(page.getByTestId('finding').nth(index).getAttribute('aria-pressed')).resolves.toBe('true');
    await page.getByTestId('zoom-label').waitFor({ state: 'attached' });
    await page.getByTestId('field-chart').locator('[data-testid="finding-range"]').waitFor({ state: 'attached' });
    await screenshot(page, 'run-page-finding');
  });

  it('moves one step with ArrowRight while the field chart has focus, and marks new extrema', async () => {
    await page.goto(`${appUrl()}/w/${workspace}/runs/${failingRun}?step=0`);
    const field = page.getByTestId('field-chart');
    await field.locator('[data-series="current"]').waitFor({ state: 'attached' });
    await field.focus();
    await page.keyboard.press('ArrowRight');
    const next = await waitForStepChange(page, 0);
    expect(next).toBeGreaterThan(0);
    await expect(page.getByTestId('step-slider').inputValue()).resolves.toBe('1');
    expect(new URL(page.url()).searchParams.get('step')).toBe(String(next));
    // Lax-Wendroff grows ripples at the edges of the top hat: the step of the new-extrema finding shows them circled.
    const gained = findings.find((f) => f.kind === 'new-extrema');
    expect(gained).toBeDefined();
    await page.goto(`${appUrl()}/w/${workspace}/runs/${failingRun}?step=${gained!.step}`);
    await page
      .getByTestId('field-chart')
      .locator('circle[data-testid="extremum-mark"]')
      .first()
      .waitFor({ state: 'attached' });
  });

  it('switches the metric chart to extrema, min/max with bounds, and mass drift', async () => {
    await page.goto(`${appUrl()}/w/${workspace}/runs/${failingRun}`);
    await page.getByTestId('tv-chart').locator('[data-testid="series-line"]').first().waitFor({ state: 'attached' });
    await page.getByRole('button', { name: 'Min / max', exact: true }).click();
    await page.getByTestId('tv-chart').locator('[data-series="max"]').waitFor({ state: 'attached' });
    await expect(page.getByTestId('tv-chart').locator('line[data-testid="series-rule"]').count()).resolves.toBe(2);
    await page.getByRole('button', { name: 'Extrema', exact: true }).click();
    await page.getByTestId('tv-chart').locator('[data-series="new-extrema"]').waitFor({ state: 'attached' });
    await page.getByRole('button', { name: 'Mass drift', exact: true }).click();
    await page.getByTestId('tv-chart').locator('[data-series="mass-drift"]').waitFor({ state: 'attached' });
  });

  it('draws a 2D run as a heat map of the field and of where variation grew', async () => {
    await page.goto(`${appUrl()}/w/${workspace}/runs/${planeRun}?step=0`);
    const fieldMap = page.getByTestId('heat-map-field');
    await fieldMap.locator('rect[data-testid="heat-cell"]').first().waitFor({ state: 'attached' });
    await expect(fieldMap.locator('rect[data-testid="heat-cell"]').count()).resolves.toBe(12 * 20);
    await page.getByTestId('plane-field').focus();
    await page.keyboard.press('ArrowRight');
    await waitForStepChange(page, 0);
    const growthMap = page.getByTestId('heat-map-growth');
    await growthMap.locator('rect[data-testid="heat-cell"]').first().waitFor({ state: 'attached' });
    await expect(growthMap.locator('rect[data-testid="heat-cell"]').count()).resolves.toBe(12 * 20);
    await screenshot(page, 'run-page-2d');
  });

  it("shows the reader's message prominently for a run that could not be read", async () => {
    await page.goto(`${appUrl()}/w/${workspace}/runs/${errorRun}`);
    // Streamed content sits hidden until React reveals it; wait until it is on screen.
    await page.getByTestId('run-error').waitFor();
    await expect(page.getByTestId('run-error').textContent()).resolves.toMatch(/Line 58/);
    await expect(page.getByTestId('tv-chart').count()).resolves.toBe(0);
    await screenshot(page, 'run-page-error');
  });

  it('waits on a queued run and shows the outcome by itself once the run is finished', async () => {
    // A run with no analysis job stays queued until this test finishes it; no worker is involved.
    const build = await ensureBuild({
      workspaceId: project.workspaceId,
      projectId: project.projectId,
      key: 'nightly-42',
      commit: 'c0ffee42',
      branch: 'main',
    });
    const kase = await ensureCase({
      workspaceId: project.workspaceId,
      projectId: project.projectId,
      name: 'slow-case',
    });
    const run = await insertRun({
      workspaceId: project.workspaceId,
      projectId: project.projectId,
      buildId: build.id,
      caseId: kase.id,
      manifest: {},
    });
    await page.goto(`${appUrl()}/w/${workspace}/runs/${run.id}`);
    await page.getByTestId('run-waiting').waitFor();
    await expect(page.getByTestId('run-waiting').textContent()).resolves.toMatch(/Queued/);
    await screenshot(page, 'run-page-queued');
    await replaceRunResults(
      {
        workspaceId: project.workspaceId,
        runId: run.id,
        result: {
          variables: [],
          findings: [],
          verdict: 'error',
          policy: null,
          errorMessage: 'Line 3, column 2 ("u"): "abc" is not a number.',
        },
      },
      getDb(),
    );
    await page.getByTestId('run-error').waitFor({ timeout: 15_000 });
    await expect(page.getByTestId('run-error').textContent()).resolves.toMatch(/Line 3, column 2/);
    await expect(page.getByTestId('run-waiting').count()).resolves.toBe(0);
  });

  it('answers 404 for a run of another workspace and for a malformed id', async () => {
    const other = await createTestProject('hidden-marsh');
    const foreign = await postRun(other.token, { build: 'nightly-1', case: 'tophat' }, { path: vanLeer });
    const res = await page.goto(`${appUrl()}/w/${workspace}/runs/${foreign.body.run.id}`);
    expect(res?.status()).toBe(404);
    await page.getByTestId('run-not-found').waitFor();
    const bad = await page.goto(`${appUrl()}/w/${workspace}/runs/not-a-run`);
    expect(bad?.status()).toBe(404);
  });

  it('stays readable in a narrow window with the dark theme', async () => {
    const narrow = await browser.newPage({ viewport: { width: 390, height: 844 }, colorScheme: 'dark' });
    const errors: string[] = [];
    await signInSettled(narrow, viewer);
    narrow.on('pageerror', (e) => errors.push(e.message));
    await narrow.goto(`${appUrl()}/w/${workspace}/runs/${failingRun}`);
    // The theme script follows the system preference when nobody chose a theme.
    await narrow.waitForFunction(() => document.documentElement.classList.contains('dark'), undefined, {
      timeout: 5000,
    });
    await narrow.getByTestId('field-chart').locator('[data-series="current"]').waitFor({ state: 'attached' });
    await narrow.getByTestId('tv-chart').locator('[data-testid="series-line"]').first().waitFor({ state: 'attached' });
    const overflow = await narrow.evaluate(
      () => document.documentElement.scrollWidth - document.documentElement.clientWidth,
    );
    expect(overflow).toBeLessThanOrEqual(0);
    await screenshot(narrow, 'run-page-narrow-dark');
    await narrow.goto(`${appUrl()}/w/${workspace}/runs/${planeRun}?step=2`);
    await narrow.getByTestId('heat-map-growth').locator('rect').first().waitFor({ state: 'attached' });
    await screenshot(narrow, 'run-page-2d-narrow-dark');
    await narrow.close();
    expect(errors).toEqual([]);
  });

  it('lets a viewer note something on the run, shown with their name', async () => {
    await page.goto(`${appUrl()}/w/${workspace}/runs/${failingRun}`);
    const form = page.getByRole('form', { name: 'Add a note' });
    await form
      .getByLabel('Add a note')
      .fill('Oscillation starts where the limiter was switched off; see the scheme change.');
    await form.getByRole('button', { name: 'Save note' }).click();
    await page.getByTestId('run-notes').getByText('limiter was switched off').waitFor();
    await expect(page.getByTestId('run-notes').textContent()).resolves.toContain('Test person');
  });

  it('offers no baseline control to a viewer, and lets a maintainer accept the failing run after a comparison', async () => {
    await page.goto(`${appUrl()}/w/${workspace}/runs/${failingRun}`);
    await expect(page.getByTestId('baseline-panel').count()).resolves.toBe(1);
    await expect(page.getByRole('button', { name: /Accept as baseline/ }).count()).resolves.toBe(0);

    const maintainer = await createTestUser({ workspaceId: project.workspaceId, role: 'maintainer' });
    const own = await browser.newPage({ viewport: { width: 1360, height: 1000 } });
    await signInSettled(own, maintainer);
    await own.goto(`${appUrl()}/w/${workspace}/runs/${failingRun}`);
    const panel = own.getByTestId('baseline-panel');
    await expect(panel.textContent()).resolves.toContain('Current baseline');
    await panel.getByRole('button', { name: 'Accept as baseline…' }).click();
    const dialog = own.getByRole('dialog');
    // The confirmation compares this run's key metrics with the accepted run's before anything changes.
    await expect(dialog.getByTestId('baseline-comparison').locator('tbody tr').count()).resolves.toBeGreaterThan(0);
    await screenshot(own, 'run-page-baseline-confirm');
    await dialog.getByRole('button', { name: 'Accept as baseline' }).click();
    await panel.getByText('This run is the baseline').waitFor();
    await own.close();
  });

  it('raised no script errors on any page it opened', () => {
    expect(pageErrors).toEqual([]);
  });
});
