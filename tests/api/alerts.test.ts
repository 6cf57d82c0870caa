import { beforeAll, describe, expect, it } from 'vitest';
import { getSql } from '@/db/client';
import { BUILD_ALERTS_JOB, DELIVER_MAIL_JOB } from '@/src/server/jobs/notification-names';
import { processBuildAlerts } from '@/src/server/services/alerts';
import { createTestProject, fixturePath, type TestProject } from '../support/api';
import { appUrl } from '../support/env';
import {
  backdateBuild,
  deliveriesTo,
  mailTo,
  parsedMail,
  postBuild,
  rawHeader,
  sleep,
  subscribe,
  uniqueAddress,
  waitForJobsSettled,
  waitForMailTo,
} from '../support/notifications';

const PASS = fixturePath('snapshots', 'tophat-van-leer.csv');
const FAIL = fixturePath('snapshots', 'tophat-lax-wendroff.csv');

async function buildId(project: TestProject, key: string): Promise<string> {
  const [row] = await getSql()<
    { id: string }[]
  >`select id from builds where project_id = ${project.projectId} and key = ${key}`;
  return row!.id;
}

/** Waits until every alert job of these builds (and the mails they queued) has finished. */
async function settleAlerts(project: TestProject, keys: string[]): Promise<void> {
  const ids = await Promise.all(keys.map((k) => buildId(project, k)));
  const [runRows] = [await getSql()<{ id: string }[]>`select id from runs where build_id = any(${ids})`];
  await waitForJobsSettled(
    [BUILD_ALERTS_JOB],
    [...runRows.map((r) => `build-alerts:run:${r.id}`), ...ids.map((id) => `build-alerts:wait:${id}:`)],
    90_000,
  );
  await waitForJobsSettled(
    [DELIVER_MAIL_JOB],
    ids.map((id) => `deliver:alert:%:${id}:`),
    60_000,
  );
}

describe('failure alerts from the analysis of real uploads', () => {
  let project: TestProject;
  const watcher = uniqueAddress('watcher');
  const digestOnly = uniqueAddress('digest-only');
  let watcherSubId: string;

  beforeAll(async () => {
    project = await createTestProject('alert-flow');
    watcherSubId = (await subscribe(project, watcher, { weeklyDigest: false, failureAlerts: true })).id;
    await subscribe(project, digestOnly, { weeklyDigest: true, failureAlerts: false });
  });

  it('mails each alert subscriber once per build, listing every case that started failing in it', async () => {
    await postBuild(project, 'n-1', { 'bay-front': PASS, 'groyne-wake': PASS, 'reef-gap': PASS });
    await postBuild(project, 'n-2', { 'bay-front': FAIL, 'groyne-wake': FAIL, 'reef-gap': PASS });
    const [mail] = await waitForMailTo(watcher);
    await settleAlerts(project, ['n-1', 'n-2']);
    expect(await mailTo(watcher)).toHaveLength(1);
    expect(mail!.subject).toMatch(/2 cases started failing in build n-2$/);
    expect(mail!.text).toContain('- bay-front (passed in build n-1)');
    expect(mail!.text).toContain('- groyne-wake (passed in build n-1)');
    expect(mail!.text).not.toContain('reef-gap');
    expect(mail!.text).toMatch(/does not validate the physics/);
    const { raw } = await parsedMail(mail!.id);
    expect(rawHeader(raw, 'List-Unsubscribe')).toMatch(new RegExp(`^<${appUrl()}/unsubscribe/one-click\\?token=`));
    expect(rawHeader(raw, 'List-Unsubscribe-Post')).toBe('List-Unsubscribe=One-Click');
    // Subscribers without alerts get none (a weekly digest may reach them if the suite runs at its hour).
    expect((await mailTo(digestOnly)).filter((m) => m.subject.includes('started failing'))).toEqual([]);
    expect((await deliveriesTo(digestOnly)).filter((d) => d.kind === 'alert')).toEqual([]);
    const rows = await deliveriesTo(watcher);
    expect(rows).toHaveLength(1);
    expect(rows[0]).toMatchObject({ kind: 'alert', status: 'sent' });
    expect((rows[0]!.payload.streaks as string[]).length).toBe(2);
  });

  it('does not mail again while the cases keep failing', async () => {
    await postBuild(project, 'n-3', { 'bay-front': FAIL, 'groyne-wake': FAIL, 'reef-gap': PASS });
    await settleAlerts(project, ['n-3']);
    await sleep(1000);
    expect(await mailTo(watcher)).toHaveLength(1);
    expect(await deliveriesTo(watcher)).toHaveLength(1);
  });

  it('ignores failures on other branches than the default one', async () => {
    const runs = await postBuild(project, 'topic-1', { 'reef-gap': FAIL }, { branch: 'feature/new-limiter' });
    const jobs = await getSql()`select 1 from jobs where dedupe_key = ${`build-alerts:run:${runs['reef-gap']!.id}`}`;
    expect(jobs).toHaveLength(0);
  });

  it('mails again for a new streak: a case that was fixed and fails again, and a case that newly fails', async () => {
    await postBuild(project, 'n-4', { 'bay-front': PASS, 'groyne-wake': FAIL, 'reef-gap': PASS });
    await postBuild(project, 'n-5', { 'bay-front': FAIL, 'groyne-wake': FAIL, 'reef-gap': FAIL });
    const mails = await waitForMailTo(watcher, 2);
    await settleAlerts(project, ['n-4', 'n-5']);
    expect(await mailTo(watcher)).toHaveLength(2);
    const second = mails.find((m) => m.subject.includes('n-5'))!;
    expect(second.subject).toMatch(/2 cases started failing in build n-5$/);
    expect(second.text).toContain('- bay-front (passed in build n-4)');
    expect(second.text).toContain('- reef-gap (passed in build n-4)');
    expect(second.text).not.toContain('groyne-wake');
    expect(watcherSubId).toBeTruthy();
  });
});

describe('alert de-duplication per subscriber, case and failing streak', () => {
  let project: TestProject;

  beforeAll(async () => {
    project = await createTestProject('alert-streaks');
    const t0 = Date.now() - 10 * 86_400_000;
    await postBuild(project, 'm-1', { 'weir-jump': PASS });
    await postBuild(project, 'm-2', { 'weir-jump': FAIL });
    await postBuild(project, 'm-3', { 'weir-jump': FAIL });
    await backdateBuild(project, 'm-1', new Date(t0));
    await backdateBuild(project, 'm-2', new Date(t0 + 86_400_000));
    await backdateBuild(project, 'm-3', new Date(t0 + 2 * 86_400_000));
    // Nobody subscribed yet: let the alert jobs of these builds finish with nothing to send.
    await settleAlerts(project, ['m-1', 'm-2', 'm-3']);
  });

  it('mails one alert when two builds of the same streak are handled at once, in either order of finishing', async () => {
    const address = uniqueAddress('streak');
    await subscribe(project, address, { weeklyDigest: false, failureAlerts: true });
    const m2 = await buildId(project, 'm-2');
    const m3 = await buildId(project, 'm-3');
    // Pretend m-2's run had not finished when m-3 was judged: m-3 then looks like the first failure.
    const [m2Run] = await getSql()<{ id: string }[]>`select id from runs where build_id = ${m2}`;
    await getSql()`update runs set verdict = null, status = 'analysing' where id = ${m2Run!.id}`;
    const since = new Date().toISOString();
    const first = await processBuildAlerts({ buildId: m3, since });
    expect(first).toEqual({ status: 'done', newlyFailing: 1, mails: 1 });
    await getSql()`update runs set verdict = 'fail', status = 'done' where id = ${m2Run!.id}`;
    // Now m-2 is the first failure of the same streak (after m-1's pass): no second mail, even
    // with several handlers racing (two workers, retried jobs).
    const results = await Promise.all([
      processBuildAlerts({ buildId: m2, since }),
      processBuildAlerts({ buildId: m2, since }),
      processBuildAlerts({ buildId: m3, since }),
    ]);
    expect(results.map((r) => (r.status === 'done' ? r.mails : -1))).toEqual([0, 0, 0]);
    await waitForMailTo(address);
    await sleep(1500);
    expect(await mailTo(address)).toHaveLength(1);
    expect(await deliveriesTo(address)).toHaveLength(1);
  });

  it('claims one alert per subscriber when handlers for the same build race', async () => {
    const address = uniqueAddress('race');
    await subscribe(project, address, { weeklyDigest: false, failureAlerts: true });
    const m2 = await buildId(project, 'm-2');
    const since = new Date().toISOString();
    const results = await Promise.all([1, 2, 3, 4].map(() => processBuildAlerts({ buildId: m2, since })));
    expect(results.reduce((n, r) => n + (r.status === 'done' ? r.mails : 0), 0)).toBe(1);
    await waitForMailTo(address);
    expect(await deliveriesTo(address)).toHaveLength(1);
  });

  it('waits while runs of the build are still open instead of mailing a partial list', async () => {
    const address = uniqueAddress('patient');
    await subscribe(project, address, { weeklyDigest: false, failureAlerts: true });
    const m3 = await buildId(project, 'm-3');
    const [run] = await getSql()<{ id: string }[]>`select id from runs where build_id = ${m3}`;
    await getSql()`update runs set status = 'analysing' where id = ${run!.id}`;
    try {
      const result = await processBuildAlerts({ buildId: m3, since: new Date().toISOString() });
      expect(result).toEqual({ status: 'waiting' });
      const waiting =
        await getSql()`select 1 from jobs where dedupe_key like ${`build-alerts:wait:${m3}:%`} and status = 'queued'`;
      expect(waiting.length).toBeGreaterThan(0);
    } finally {
      await getSql()`update runs set status = 'done' where id = ${run!.id}`;
    }
  });
});
