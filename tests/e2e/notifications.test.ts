/**
 * The notification settings page and the unsubscribe page in the browser: a member saves their
 * digest day, hour and time zone and turns alerts on, asks for a preview that arrives at the SMTP
 * catcher, a maintainer subscribes a mailing list, and a signed-out visitor unsubscribes with the
 * page's button.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { getSql } from '@/db/client';
import { unsubscribeToken } from '@/src/server/services/unsubscribe';
import { createTestProject, fixturePath, type TestProject } from '../support/api';
import { launchBrowser, screenshot } from '../support/browser';
import { appUrl } from '../support/env';
import { postBuild, subscribe, uniqueAddress, waitForMailTo } from '../support/notifications';
import { createTestUser, signInPage } from '../support/users';
import { workspaceSlug } from '../support/workspaces';

describe('notification settings in the browser', () => {
  let browser: Browser;
  let close: () => Promise<void>;
  let project: TestProject;
  let slug: string;

  beforeAll(async () => {
    ({ browser, close } = await launchBrowser());
    project = await createTestProject('sandbar-notify');
    slug = await workspaceSlug(project.workspaceId);
    await postBuild(project, 'nightly-1', { 'bar-migration': fixturePath('snapshots', 'tophat-van-leer.csv') });
  });
  afterAll(async () => {
    await close();
  });

  async function signedIn(role: 'viewer' | 'maintainer'): Promise<{ page: Page; email: string; id: string }> {
    const user = await createTestUser({ workspaceId: project.workspaceId, role, name: `Robin ${role}` });
    const context = await browser.newContext({ timezoneId: 'America/Halifax' });
    const page = await context.newPage();
    await signInPage(page, user);
    await page.goto(`${appUrl()}/w/${slug}/settings/notifications`);
    return { page, email: user.email, id: user.id };
  }

  it('saves a member digest day, hour, time zone and alerts, starting from the browser time zone', async () => {
    const { page, id } = await signedIn('viewer');
    const form = page.getByTestId('subscription-sandbar-notify');
    // Nothing saved yet: the zone field starts from the browser's zone.
    await expect(form.getByLabel('Time zone').inputValue()).resolves.toBe('America/Halifax');
    await form.getByLabel('Weekly digest').check();
    await form.getByLabel('Day').selectOption({ label: 'Wednesday' });
    await form.getByLabel('Hour').selectOption({ label: '09:00' });
    await form.getByLabel('Time zone').fill('Europe/Oslo');
    await form.getByLabel('Failure alerts').check();
    await form.getByRole('button', { name: 'Save' }).click();
    await form.getByText('Saved: weekly digest on, failure alerts on.').waitFor();
    // The form shows what was saved, without a reload.
    await expect(form.getByLabel('Day').inputValue()).resolves.toBe('3');
    await expect(form.getByLabel('Hour').inputValue()).resolves.toBe('9');
    await expect(form.getByLabel('Weekly digest').isChecked()).resolves.toBe(true);
    await screenshot(page, 'notifications-saved');
    const [row] = await getSql()<
      { weekly_digest: boolean; failure_alerts: boolean; digest_day: number; digest_hour: number; time_zone: string }[]
    >`
      select weekly_digest, failure_alerts, digest_day, digest_hour, time_zone from subscriptions where user_id = ${id}`;
    expect(row).toEqual({
      weekly_digest: true,
      failure_alerts: true,
      digest_day: 3,
      digest_hour: 9,
      time_zone: 'Europe/Oslo',
    });
    await page.reload();
    const again = page.getByTestId('subscription-sandbar-notify');
    await expect(again.getByLabel('Time zone').inputValue()).resolves.toBe('Europe/Oslo');
    await expect(again.getByLabel('Day').inputValue()).resolves.toBe('3');
    await page.context().close();
  });

  it('shows the field error for an unknown time zone and keeps what was typed', async () => {
    const { page } = await signedIn('viewer');
    const form = page.getByTestId('subscription-sandbar-notify');
    await form.getByLabel('Time zone').fill('Atlantis/Capital');
    await form.getByLabel('Day').selectOption({ label: 'Friday' });
    await form.getByRole('button', { name: 'Save' }).click();
    await form.getByText(/Unknown time zone/).waitFor();
    await expect(form.getByLabel('Time zone').inputValue()).resolves.toBe('Atlantis/Capital');
    await expect(form.getByLabel('Day').inputValue()).resolves.toBe('5');
    await page.context().close();
  });

  it('sends a preview of the digest to the member at once', async () => {
    const { page, email } = await signedIn('viewer');
    const card = page.getByRole('button', { name: 'Send me a preview now' }).first();
    await card.click();
    await page.getByText(`A preview of this week's digest is on its way to ${email}.`).waitFor();
    const [mail] = await waitForMailTo(email, 1, 60_000);
    expect(mail!.subject).toMatch(/^\[Preview\] /);
    await page.context().close();
  });

  it('lets a maintainer subscribe and remove a mailing list, and shows a viewer no such controls', async () => {
    const viewer = await signedIn('viewer');
    await expect(viewer.page.getByRole('form', { name: 'Subscribe a mailing list' }).count()).resolves.toBe(0);
    await viewer.page.context().close();

    const { page } = await signedIn('maintainer');
    const list = uniqueAddress('dune-team');
    const form = page.getByRole('form', { name: 'Subscribe a mailing list' });
    await form.getByLabel('Address').fill(list);
    await form.getByLabel('Failure alerts').check();
    await form.getByRole('button', { name: 'Subscribe the address' }).click();
    await page.getByTestId('mailing-lists').getByText(list).waitFor();
    await screenshot(page, 'notifications-mailing-list');
    await page.getByRole('button', { name: `Remove ${list}` }).click();
    await page.getByTestId('mailing-lists-empty').waitFor();
    await page.context().close();
  });

  it('unsubscribes a signed-out visitor with the button of the unsubscribe page', async () => {
    const sub = await subscribe(project, uniqueAddress('reader'), { weeklyDigest: true });
    const context = await browser.newContext();
    const page = await context.newPage();
    await page.goto(`${appUrl()}/unsubscribe?token=${encodeURIComponent(unsubscribeToken(sub.id, 'digest'))}`);
    await page.getByRole('heading', { name: 'Stop the weekly digest?' }).waitFor();
    await screenshot(page, 'unsubscribe-confirm');
    await page.getByRole('button', { name: 'Unsubscribe' }).click();
    await page.getByRole('heading', { name: 'Unsubscribed' }).waitFor();
    await screenshot(page, 'unsubscribe-done');
    const [row] = await getSql()<
      { weekly_digest: boolean }[]
    >`select weekly_digest from subscriptions where id = ${sub.id}`;
    expect(row!.weekly_digest).toBe(false);
    await context.close();
  });
});
