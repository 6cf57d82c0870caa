import { beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { getSql } from '@/db/client';
import { DELIVER_MAIL_JOB, SEND_DIGEST_JOB } from '@/src/server/jobs/notification-names';
import { enqueueDueDigests } from '@/src/server/services/digests';
import { unsubscribeToken } from '@/src/server/services/unsubscribe';
import { createTestProject, fixturePath, type TestProject } from '../support/api';
import { appUrl } from '../support/env';
import {
  deliveriesTo,
  mailTo,
  parsedMail,
  postBuild,
  rawHeader,
  subscribe,
  timingDueNow,
  uniqueAddress,
  waitForJobsSettled,
  waitForMailTo,
} from '../support/notifications';

const PASS = fixturePath('snapshots', 'tophat-van-leer.csv');

async function flags(subscriptionId: string): Promise<{ weeklyDigest: boolean; failureAlerts: boolean }> {
  const [row] = await getSql()<{ weeklyDigest: boolean; failureAlerts: boolean }[]>`
    select weekly_digest as "weeklyDigest", failure_alerts as "failureAlerts" from subscriptions where id = ${subscriptionId}`;
  return row!;
}

/** Path and query of an absolute app URL, for supertest against the app. */
const pathOf = (url: string) => {
  const u = new URL(url);
  return `${u.pathname}${u.search}`;
};

function tamper(url: string): string {
  const u = new URL(url);
  const token = u.searchParams.get('token')!;
  const i = Math.floor(token.length / 3);
  u.searchParams.set('token', token.slice(0, i) + (token[i] === 'x' ? 'y' : 'x') + token.slice(i + 1));
  return u.toString();
}

describe('unsubscribe links, signed out', () => {
  let project: TestProject;
  const reader = uniqueAddress('reader');
  let readerSubId: string;
  let oneClick: string;
  let pageLink: string;

  beforeAll(async () => {
    project = await createTestProject('unsub-flow');
    await postBuild(project, 'nightly-1', { 'harbour-seiche': PASS });
    const due = timingDueNow('America/Halifax');
    readerSubId = (
      await subscribe(project, reader, {
        digestDay: due.digestDay,
        digestHour: due.digestHour,
        timeZone: due.timeZone,
        failureAlerts: true,
      })
    ).id;
    await enqueueDueDigests({ now: new Date() });
    const [mail] = await waitForMailTo(reader);
    const { raw, parsed } = await parsedMail(mail!.id);
    oneClick = /^<(.+)>$/.exec(rawHeader(raw, 'List-Unsubscribe') ?? '')![1]!;
    pageLink = new RegExp(`(${appUrl()}/unsubscribe\\?token=\\S+)`).exec(parsed.text ?? '')![1]!;
  });

  it('shows a confirm button on the page without changing anything (link scanners open links)', async () => {
    const res = await request(appUrl()).get(pathOf(pageLink));
    expect(res.status).toBe(200);
    expect(res.text).toContain('data-testid="unsubscribe-confirm"');
    expect(res.text).toContain('Stop the weekly digest?');
    expect(res.text).toContain('re***@saltmarsh-lab.example');
    expect(await flags(readerSubId)).toEqual({ weeklyDigest: true, failureAlerts: true });
  });

  it('refuses a tampered one-click link and a tampered page link, changing nothing', async () => {
    const res = await request(appUrl())
      .post(pathOf(tamper(oneClick)))
      .type('form')
      .send('List-Unsubscribe=One-Click');
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('invalid:token');
    const page = await request(appUrl()).get(pathOf(tamper(pageLink)));
    expect(page.status).toBe(200);
    expect(page.text).toContain('data-testid="unsubscribe-invalid"');
    expect(page.text).toContain('This link is not valid');
    expect(await flags(readerSubId)).toEqual({ weeklyDigest: true, failureAlerts: true });
  });

  it('refuses an expired link', async () => {
    const old = unsubscribeToken(readerSubId, 'digest', new Date(Date.now() - 200 * 86_400_000));
    const res = await request(appUrl())
      .post(`/unsubscribe/one-click?token=${encodeURIComponent(old)}`)
      .type('form')
      .send('List-Unsubscribe=One-Click');
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(/expired/);
    expect((await flags(readerSubId)).weeklyDigest).toBe(true);
  });

  it('asks for the RFC 8058 body on a one-click POST', async () => {
    const res = await request(appUrl()).post(pathOf(oneClick)).type('form').send('something=else');
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('invalid:unsubscribe');
  });

  it('turns the digest off with the one-click POST of the List-Unsubscribe header, without cookies, and keeps alerts', async () => {
    const res = await request(appUrl()).post(pathOf(oneClick)).type('form').send('List-Unsubscribe=One-Click');
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ unsubscribed: true, scope: 'digest' });
    expect(await flags(readerSubId)).toEqual({ weeklyDigest: false, failureAlerts: true });
    // A second click is harmless.
    const again = await request(appUrl()).post(pathOf(oneClick)).type('form').send('List-Unsubscribe=One-Click');
    expect(again.status).toBe(200);
    const page = await request(appUrl()).get(pathOf(pageLink));
    expect(page.text).toContain('data-testid="unsubscribe-done"');
  });

  it('sends no digest to a subscriber who used the one-click link before the scheduler ran', async () => {
    const address = uniqueAddress('gone-early');
    const due = timingDueNow('America/Halifax');
    const sub = await subscribe(project, address, {
      digestDay: due.digestDay,
      digestHour: due.digestHour,
      timeZone: due.timeZone,
    });
    const token = unsubscribeToken(sub.id, 'digest');
    const res = await request(appUrl())
      .post(`/unsubscribe/one-click?token=${encodeURIComponent(token)}`)
      .type('form')
      .send('List-Unsubscribe=One-Click');
    expect(res.status).toBe(200);
    await enqueueDueDigests({ now: new Date() });
    await waitForJobsSettled(
      [SEND_DIGEST_JOB, DELIVER_MAIL_JOB],
      [`send-digest:${sub.id}:`, `deliver:digest:${sub.id}:`, `send-digest:${readerSubId}:`],
    );
    expect(await mailTo(address)).toEqual([]);
    expect(await deliveriesTo(address)).toEqual([]);
    // The reader, unsubscribed after their digest, still has exactly the one.
    expect(await mailTo(reader)).toHaveLength(1);
  });

  it('works from the page button too: the form posts to the one-click handler and comes back to the page', async () => {
    const address = uniqueAddress('button');
    const sub = await subscribe(project, address, { weeklyDigest: false, failureAlerts: true });
    const token = unsubscribeToken(sub.id, 'alerts');
    const page = await request(appUrl()).get(`/unsubscribe?token=${encodeURIComponent(token)}`);
    expect(page.text).toContain('Stop failure alerts?');
    const action = /<form[^>]*action="([^"]+)"/.exec(page.text)![1]!.replace(/&amp;/g, '&');
    const res = await request(appUrl())
      .post(action)
      .type('form')
      .send({ 'List-Unsubscribe': 'One-Click', via: 'page' });
    expect(res.status).toBe(303);
    // Relative, so that it stays on the origin the browser used (whatever host the app thinks it has).
    expect(res.headers.location).toBe(`/unsubscribe?token=${encodeURIComponent(token)}`);
    expect(await flags(sub.id)).toEqual({ weeklyDigest: false, failureAlerts: false });
    // Opening the one-click address in a browser leads to the page, not to an action.
    const get = await request(appUrl()).get(`/unsubscribe/one-click?token=${encodeURIComponent(token)}`);
    expect(get.status).toBe(303);
  });
});
