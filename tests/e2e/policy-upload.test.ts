/**
 * Manual upload, the case policy form and baseline acceptance in Chromium, as a maintainer and
 * as a viewer. Screenshots go to test-results/screenshots (policy-upload-*.png).
 */
import fs from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { getMembershipById } from '@/src/server/queries/users';
import { createTestProject, fixturePath, postRun, waitForRun, type TestProject } from '../support/api';
import { launchBrowser, screenshot } from '../support/browser';
import { appUrl } from '../support/env';
import { createTestUser, signInPage, type TestUser } from '../support/users';

const vanLeer = fixturePath('snapshots', 'tophat-van-leer.csv');
const laxWendroff = fixturePath('snapshots', 'tophat-lax-wendroff.csv');
const RUN_URL = /\/w\/[^/]+\/runs\/[0-9a-f-]{36}$/;

describe('manual upload, case policy and baseline in Chromium', () => {
  let browser: Browser;
  let close: () => Promise<void>;
  let project: TestProject;
  let workspace: string;
  let maintainer: TestUser;
  let viewer: TestUser;
  const contexts: BrowserContext[] = [];

  async function signedIn(user: TestUser, options: Parameters<Browser['newContext']>[0] = {}): Promise<Page> {
    const context = await browser.newContext({ viewport: { width: 1280, height: 900 }, ...options });
    contexts.push(context);
    const page = await context.newPage();
    await signInPage(page, user);
    return page;
  }

  /** Every CSP refusal the page reports in its console, so a blocked upload says why. */
  function cspViolations(page: Page): string[] {
    const seen: string[] = [];
    page.on('console', (m) => {
      if (/Content[- ]Security[- ]Policy/i.test(m.text())) seen.push(m.text());
    });
    return seen;
  }

  /** Records every value the progress bar takes, from the page itself (soft navigation keeps window). */
  async function recordProgress(page: Page): Promise<void> {
    await page.evaluate(() => {
      const w = window as unknown as { progressValues: string[] };
      w.progressValues = [];
      new MutationObserver(() => {
        const bar = document.querySelector('[role="progressbar"]');
        const v = bar?.getAttribute('aria-valuenow');
        if (v !== null && v !== undefined && w.progressValues.at(-1) !== v) w.progressValues.push(v);
      }).observe(document.body, {
        subtree: true,
        childList: true,
        attributes: true,
        attributeFilter: ['aria-valuenow'],
      });
    });
  }

  /**
   * Submits the upload form and waits for the run page; when the page shows an error instead,
   * fails at once with it (and any CSP refusal: a build whose CSP names another S3 origin).
   */
  async function submitUpload(page: Page, csp: string[]): Promise<void> {
    const form = page.getByRole('form', { name: 'Upload a snapshot file' });
    await form.getByRole('button', { name: 'Upload and analyse' }).click();
    const outcome = await Promise.race([
      page.waitForURL(RUN_URL, { timeout: 60_000 }).then(() => 'run page'),
      form
        .getByRole('alert')
        .waitFor({ timeout: 60_000 })
        .then(() => 'alert'),
    ]);
    if (outcome === 'alert')
      throw new Error(`upload failed: ${await form.getByRole('alert').textContent()} ${csp.join(' | ')}`);
  }

  async function runVerdict(runId: string): Promise<string | null> {
    const res = await request(appUrl()).get(`/api/v1/runs/${runId}`).set('Authorization', `Bearer ${project.token}`);
    return res.body.run.verdict as string | null;
  }

  const casePath = (name: string) => `${appUrl()}/w/${workspace}/projects/${project.slug}/cases/${name}`;

  beforeAll(async () => {
    ({ browser, close } = await launchBrowser());
    project = await createTestProject('saltmarsh');
    maintainer = await createTestUser({ workspaceId: project.workspaceId, role: 'maintainer', name: 'Maren Holt' });
    viewer = await createTestUser({ workspaceId: project.workspaceId, role: 'viewer', name: 'Ivo Brandt' });
    workspace = (await getMembershipById({ userId: maintainer.id, workspaceId: project.workspaceId }))!.slug;
  });
  afterAll(async () => {
    for (const c of contexts) await c.close();
    await close();
  });

  it('uploads the van Leer top hat with a real progress bar and lands on its run page with verdict pass', async () => {
    const page = await signedIn(maintainer);
    const csp = cspViolations(page);
    const puts: { url: string; status: number }[] = [];
    page.on('response', (r) => {
      if (r.request().method() === 'PUT') puts.push({ url: r.url(), status: r.status() });
    });
    await page.goto(`${appUrl()}/w/${workspace}/upload`);
    await expect(page.getByRole('heading', { level: 1 }).textContent()).resolves.toBe('Upload a snapshot file');
    const form = page.getByRole('form', { name: 'Upload a snapshot file' });
    await form.getByLabel('Choose a snapshot file').setInputFiles(vanLeer);
    await expect(page.getByTestId('chosen-file').textContent()).resolves.toContain('tophat-van-leer.csv');
    await form.getByLabel('Case').fill('tophat-monotone-manual');
    await expect(form.getByLabel('Build key').inputValue()).resolves.toMatch(/^manual-\d{4}-\d{2}-\d{2}$/);
    await expect(form.getByLabel('Commit').inputValue()).resolves.toBe('manual');
    await form.getByLabel('Variable name(s)').fill('u');
    await screenshot(page, 'policy-upload-form');
    await recordProgress(page);

    await submitUpload(page, csp);
    const progress = await page.evaluate(() => (window as unknown as { progressValues: string[] }).progressValues);
    expect(progress.at(-1)).toBe('100');
    expect(puts).toHaveLength(1);
    expect(new URL(puts[0]!.url).origin).not.toBe(new URL(appUrl()).origin);
    expect(puts[0]!.status).toBe(200);
    expect(csp).toEqual([]);

    const badge = page.getByRole('heading', { level: 1 }).locator('[data-verdict]');
    await expect(badge.getAttribute('data-verdict')).resolves.toBe('pass');
    await expect(badge.textContent()).resolves.toBe('pass');
    await expect(page.getByTestId('run-case').textContent()).resolves.toBe('tophat-monotone-manual');
    await screenshot(page, 'policy-upload-run-pass');
  });

  it('uploads the Lax-Wendroff top hat by drag and drop and lands on its run page with verdict fail', async () => {
    const page = await signedIn(maintainer);
    const csp = cspViolations(page);
    await page.goto(`${appUrl()}/w/${workspace}/upload`);
    const content = fs.readFileSync(laxWendroff, 'utf8');
    const dataTransfer = await page.evaluateHandle(
      ({ text, name }) => {
        const dt = new DataTransfer();
        dt.items.add(new File([text], name, { type: 'text/csv' }));
        return dt;
      },
      { text: content, name: 'tophat-lax-wendroff.csv' },
    );
    await page.getByTestId('drop-zone').dispatchEvent('drop', { dataTransfer });
    await expect(page.getByTestId('chosen-file').textContent()).resolves.toContain('tophat-lax-wendroff.csv');
    const form = page.getByRole('form', { name: 'Upload a snapshot file' });
    // A bad case name is refused on the page, before anything is sent.
    await form.getByLabel('Case').fill('tophat dispersive');
    await form.getByRole('button', { name: 'Upload and analyse' }).click();
    await expect(form.getByText(/letters, digits, dot, dash or underscore/).count()).resolves.toBe(1);
    await expect(page.evaluate(() => document.activeElement?.getAttribute('aria-invalid'))).resolves.toBe('true');
    await form.getByLabel('Case').fill('tophat-dispersive-manual');
    await submitUpload(page, csp);
    await expect(
      page.getByRole('heading', { level: 1 }).locator('[data-verdict]').getAttribute('data-verdict'),
    ).resolves.toBe('fail');
  });

  it('shows the verdict a looser policy would give before saving, then saves and re-judges the stored run', async () => {
    const page = await signedIn(maintainer);
    await page.goto(casePath('tophat-dispersive-manual'));
    const history = page.getByTestId('case-history');
    const runHref = await history.locator('a[href*="/runs/"]').first().getAttribute('href');
    const runId = runHref!.split('/').pop()!;
    expect(await runVerdict(runId)).toBe('fail');

    const form = page.getByRole('form', { name: 'Case policy' });
    const tv = form.getByRole('group', { name: 'Total variation growth' });
    // Built-in defaults are shown beside the fields.
    await expect(tv.getByText('Default 1e-9', { exact: false }).count()).resolves.toBeGreaterThan(0);
    await expect(form.getByText(/a pass does not validate the physics/i).count()).resolves.toBe(1);

    // Typing nonsense is refused on the page with the field marked and focused.
    await form.getByRole('group', { name: 'New extrema' }).getByLabel('New extrema allowed per step').fill('lots');
    await form.getByRole('button', { name: 'Preview and save…' }).click();
    await expect(form.getByText('Enter a number, e.g. 0.5 or 1e-9.').count()).resolves.toBe(1);
    await expect(page.evaluate(() => (document.activeElement as HTMLInputElement | null)?.value)).resolves.toBe('lots');

    // A per-variable override with crossed physical bounds is refused beside the field; removing it clears the error.
    await form.getByRole('group', { name: 'New extrema' }).getByLabel('New extrema allowed per step').fill('');
    await form.getByLabel('Add an override for variable').fill('u');
    await form.getByLabel('Add an override for variable').press('Enter');
    const override = form.getByRole('group', { name: 'Variable u' });
    await override.getByLabel('Physical lower bound').fill('1');
    await override.getByLabel('Physical upper bound').fill('0');
    await override.getByLabel('System variable').selectOption('true');
    await form.getByRole('button', { name: 'Preview and save…' }).click();
    await expect(override.getByText('The lower bound must not exceed the upper bound.').count()).resolves.toBe(1);
    await screenshot(page, 'policy-upload-override-error');
    await override.getByRole('button', { name: 'Remove the override of u' }).click();
    await expect(form.getByTestId('variable-override').count()).resolves.toBe(0);
    await expect(form.getByText('The lower bound must not exceed the upper bound.').count()).resolves.toBe(0);

    await tv.getByLabel('TV growth check').selectOption('off');
    await form.getByRole('group', { name: 'New extrema' }).getByLabel('New extrema allowed per step').fill('100');
    await form
      .getByRole('group', { name: 'Bounds (overshoot and undershoot)' })
      .getByLabel('Bounds check')
      .selectOption('off');
    await form.getByRole('button', { name: 'Preview and save…' }).click();
    const preview = page.getByRole('region', { name: 'Preview of the new policy' });
    await preview.waitFor();
    const sentence = preview.getByTestId('policy-preview-verdict');
    await expect(
      sentence.locator('[data-verdict]').evaluateAll((els) => els.map((e) => e.getAttribute('data-verdict'))),
    ).resolves.toEqual(['fail', 'pass']);
    await screenshot(page, 'policy-upload-preview');
    // Nothing is stored by a preview.
    expect(await runVerdict(runId)).toBe('fail');

    await expect(preview.getByLabel('Re-judge this run with the new policy when saving').isChecked()).resolves.toBe(
      true,
    );
    await preview.getByRole('button', { name: 'Save policy' }).click();
    await form.getByText(/re-judged: fail → pass/).waitFor();
    expect(await runVerdict(runId)).toBe('pass');

    await page.reload();
    await expect(
      page.getByTestId('case-history').locator('[data-verdict]').first().getAttribute('data-verdict'),
    ).resolves.toBe('pass');
    const reloaded = page.getByRole('form', { name: 'Case policy' });
    await expect(
      reloaded.getByRole('group', { name: 'Total variation growth' }).getByLabel('TV growth check').inputValue(),
    ).resolves.toBe('off');
    await expect(
      reloaded.getByRole('group', { name: 'New extrema' }).getByLabel('New extrema allowed per step').inputValue(),
    ).resolves.toBe('100');
    await screenshot(page, 'policy-upload-case-after-save');
  });

  it('accepts a run as baseline after a confirmation that compares it with the current baseline', async () => {
    const page = await signedIn(maintainer);
    const caseName = 'tophat-monotone-manual';
    await page.goto(casePath(caseName));
    const panel = page.getByTestId('baseline-panel');
    await expect(panel.textContent()).resolves.toContain('No baseline on main yet');
    await panel.getByRole('button', { name: 'Accept as baseline…' }).click();
    const dialog = page.getByRole('dialog');
    await expect(dialog.getByRole('heading').textContent()).resolves.toMatch(
      /the baseline of tophat-monotone-manual on main\?/,
    );
    await expect(dialog.getByTestId('baseline-comparison').locator('tbody tr').count()).resolves.toBe(5);
    await dialog.getByRole('button', { name: 'Accept as baseline' }).click();
    await panel.getByText('This run is the baseline').waitFor();

    // A later, worse run of the same case: the confirmation shows both side by side.
    const posted = await postRun(
      project.token,
      { build: 'nightly-901', case: caseName, branch: 'main' },
      { path: laxWendroff },
    );
    await waitForRun(project.token, posted.body.run.id);
    await page.reload();
    await expect(page.getByTestId('baseline-panel').textContent()).resolves.toContain('Current baseline');
    await page.getByTestId('baseline-panel').getByRole('button', { name: 'Accept as baseline…' }).click();
    await expect(
      page
        .getByRole('dialog')
        .getByTestId('baseline-verdicts')
        .locator('[data-verdict]')
        .evaluateAll((els) => els.map((e) => e.getAttribute('data-verdict'))),
    ).resolves.toEqual(['pass', 'fail']);
    const table = page.getByRole('dialog').getByTestId('baseline-comparison');
    await expect(table.locator('thead th').allTextContents()).resolves.toEqual([
      'Variable',
      'Metric',
      'Baseline',
      'This run',
      'Change',
    ]);
    const extrema = table.locator('tr', { hasText: 'Max new extrema per step' });
    await expect(extrema.locator('td').last().textContent()).resolves.toBe('higher');
    await screenshot(page, 'policy-upload-baseline-confirm');
    await page.getByRole('dialog').getByRole('button', { name: 'Accept as baseline' }).click();
    await page.getByTestId('baseline-panel').getByText('This run is the baseline').waitFor();
    await expect(page.getByTestId('case-baselines').textContent()).resolves.toContain('nightly-901');
  });

  it('shows a viewer the policy read-only, without the accept control, and no upload page', async () => {
    const page = await signedIn(viewer);
    await page.goto(casePath('tophat-dispersive-manual'));
    await expect(page.getByTestId('baseline-panel').count()).resolves.toBe(1);
    await expect(page.getByRole('button', { name: /Accept as baseline/ }).count()).resolves.toBe(0);
    const form = page.getByRole('form', { name: 'Case policy' });
    await expect(form.getByRole('button', { name: 'Preview and save…' }).count()).resolves.toBe(0);
    await expect(
      form.getByRole('group', { name: 'Total variation growth' }).getByLabel('TV growth check').isDisabled(),
    ).resolves.toBe(true);
    await expect(
      form.getByText('You can read this policy; maintainers of the workspace change it.').count(),
    ).resolves.toBe(1);
    await screenshot(page, 'policy-upload-viewer-case');
    const upload = await page.goto(`${appUrl()}/w/${workspace}/upload`);
    expect(upload?.status()).toBe(404);
  });

  it('fits a narrow window and the dark theme', async () => {
    const page = await signedIn(maintainer, { viewport: { width: 390, height: 844 }, colorScheme: 'dark' });
    const problems: string[] = [];
    page.on('console', (m) => {
      if (m.type() === 'error') problems.push(m.text());
    });
    page.on('pageerror', (e) => problems.push(e.message));
    await page.goto(`${appUrl()}/w/${workspace}/upload`);
    const theme = await page.evaluate(() => ({
      cls: document.documentElement.className,
      media: matchMedia('(prefers-color-scheme: dark)').matches,
      stored: localStorage.getItem('varigate-theme'),
    }));
    expect({ theme, problems }).toMatchObject({ theme: { cls: expect.stringContaining('dark') } });
    expect(await page.evaluate(() => document.documentElement.scrollWidth <= window.innerWidth + 1)).toBe(true);
    await screenshot(page, 'policy-upload-narrow-dark-upload');
    await page.goto(casePath('tophat-dispersive-manual'));
    await screenshot(page, 'policy-upload-narrow-dark-case');
    await page.goto(`${appUrl()}/w/${workspace}/projects/${project.slug}/settings`);
    await expect(page.getByRole('heading', { level: 1 }).textContent()).resolves.toBe('Project settings');
    await screenshot(page, 'policy-upload-narrow-dark-settings');
  });
});
