/**
 * What each role sees in the browser. A viewer reads the overview and the member list but gets
 * no control that changes anything (no invite form, no role menus, no token creation, no Upload
 * link); a maintainer creates a CI token and sees its secret exactly once.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { createTestProject, type TestProject } from '../support/api';
import { launchBrowser, screenshot } from '../support/browser';
import { appUrl } from '../support/env';
import { createTestUser, signInPage } from '../support/users';
import { workspaceSlug } from '../support/workspaces';

describe('roles in the browser', () => {
  let browser: Browser;
  let close: () => Promise<void>;
  let project: TestProject;
  let slug: string;

  beforeAll(async () => {
    ({ browser, close } = await launchBrowser());
    project = await createTestProject('glasswort');
    slug = await workspaceSlug(project.workspaceId);
  });
  afterAll(async () => {
    await close();
  });

  async function signedInPage(role: 'viewer' | 'maintainer' | 'admin'): Promise<Page> {
    const user = await createTestUser({ workspaceId: project.workspaceId, role, name: `Sam ${role}` });
    const context = await browser.newContext();
    const page = await context.newPage();
    await signInPage(page, user);
    return page;
  }

  it('shows a viewer the overview and the members, with no control that changes anything', async () => {
    const page = await signedInPage('viewer');
    // Signing in lands on the home page, which sends a member on to their workspace.
    await page.waitForURL((url) => url.pathname === `/w/${slug}`);
    await expect(page.getByRole('heading', { level: 1 }).textContent()).resolves.toBe('Builds needing attention');
    const nav = page.getByRole('navigation', { name: 'Workspace' });
    await expect(nav.getByRole('link', { name: 'Overview' }).count()).resolves.toBe(1);
    await expect(nav.getByRole('link', { name: 'Upload' }).count()).resolves.toBe(0);
    await expect(nav.getByRole('link', { name: 'CI tokens' }).count()).resolves.toBe(0);
    await expect(nav.getByRole('link', { name: 'Audit log' }).count()).resolves.toBe(0);
    await screenshot(page, 'roles-viewer-overview');

    await nav.getByRole('link', { name: 'Members' }).click();
    await page.waitForURL(`**/w/${slug}/settings/members`);
    await expect(page.getByTestId('member-row').count()).resolves.toBeGreaterThan(0);
    await expect(page.getByRole('form', { name: 'Invite a member' }).count()).resolves.toBe(0);
    await expect(page.getByRole('combobox').count()).resolves.toBe(0);
    await expect(page.getByRole('button', { name: /Remove|Leave|Revoke|Save/ }).count()).resolves.toBe(0);
    await screenshot(page, 'roles-viewer-members');

    const tokens = await page.goto(`${appUrl()}/w/${slug}/settings/tokens`);
    expect(tokens?.status()).toBe(404);
    await expect(page.getByRole('form', { name: 'Create a CI token' }).count()).resolves.toBe(0);
    await page.context().close();
  });

  it('lets a maintainer create a token and shows its secret once: after a reload only the prefix is left', async () => {
    const page = await signedInPage('maintainer');
    await page.getByRole('navigation', { name: 'Workspace' }).getByRole('link', { name: 'CI tokens' }).click();
    await page.waitForURL(`**/w/${slug}/settings/tokens`);
    const form = page.getByRole('form', { name: 'Create a CI token' });
    await form.getByLabel('Name').fill('nightly marsh run');
    await form.getByRole('button', { name: 'Create token' }).click();

    const secretBox = page.getByTestId('new-token-secret');
    await secretBox.waitFor();
    const secret = (await secretBox.textContent())?.trim() ?? '';
    expect(secret).toMatch(/^vgt_[0-9a-f]{8}_[A-Za-z0-9_-]{43}$/);
    const prefix = secret.slice(0, 12);
    const row = page.getByTestId('token-row').filter({ hasText: 'nightly marsh run' });
    await row.waitFor();
    await expect(row.getByTestId('token-prefix').textContent()).resolves.toContain(prefix);
    await screenshot(page, 'roles-maintainer-token-created');

    await page.reload();
    await page.getByTestId('token-row').filter({ hasText: 'nightly marsh run' }).waitFor();
    await expect(page.getByTestId('new-token-secret').count()).resolves.toBe(0);
    expect(await page.content()).not.toContain(secret.slice(13));
    await expect(
      page.getByTestId('token-row').filter({ hasText: 'nightly marsh run' }).getByTestId('token-prefix').textContent(),
    ).resolves.toContain(prefix);
    await screenshot(page, 'roles-maintainer-token-after-reload');
    await page.context().close();
  });

  it('gives an admin the invite form, the role controls and the audit log', async () => {
    const page = await signedInPage('admin');
    await page.goto(`${appUrl()}/w/${slug}/settings/members`);
    await expect(page.getByRole('form', { name: 'Invite a member' }).count()).resolves.toBe(1);
    await expect(page.getByRole('combobox', { name: /^Role of / }).count()).resolves.toBeGreaterThan(0);
    await screenshot(page, 'roles-admin-members');
    await page.getByRole('navigation', { name: 'Workspace' }).getByRole('link', { name: 'Audit log' }).click();
    await page.waitForURL(`**/w/${slug}/settings/audit`);
    await expect(page.getByTestId('audit-row').count()).resolves.toBeGreaterThan(0);
    await screenshot(page, 'roles-admin-audit');
    await page.context().close();
  });
});
