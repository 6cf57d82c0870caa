import { beforeAll, describe, expect, it } from 'vitest';
import { getSql } from '@/db/client';
import { enqueueDueDigests } from '@/src/server/services/digests';
import { deliverNotification } from '@/src/server/services/mail-delivery';
import { createTestProject, fixturePath, type TestProject } from '../support/api';
import {
  deliveriesTo,
  mailTo,
  postBuild,
  sleep,
  subscribe,
  timingDueNow,
  uniqueAddress,
  waitForJobsSettled,
  waitUntil,
} from '../support/notifications';

const PASS = fixturePath('snapshots', 'tophat-van-leer.csv');

describe('delivery log and retries against a failing SMTP server', () => {
  let project: TestProject;

  beforeAll(async () => {
    project = await createTestProject('smtp-trouble');
    await postBuild(project, 'nightly-1', { 'delta-spread': PASS });
  });

  it('retries a digest refused with 451, logs each SMTP error, and marks it failed when the last attempt fails', async () => {
    // The catcher answers 451 to any recipient containing "+smtpfail".
    const address = uniqueAddress('ops+smtpfail');
    const due = timingDueNow('Australia/Adelaide'); // UTC+10:30 in summer
    const sub = await subscribe(project, address, {
      digestDay: due.digestDay,
      digestHour: due.digestHour,
      timeZone: due.timeZone,
    });
    await enqueueDueDigests({ now: new Date() });
    const key = `digest:${sub.id}:${due.period.key}`;

    // At least two attempts, each logged with the SMTP reply, and a retry scheduled with backoff.
    const retrying = await waitUntil(
      'a second failed attempt',
      async () => {
        const [row] = await deliveriesTo(address);
        return row && row.attempts >= 2 ? row : undefined;
      },
      60_000,
    );
    expect(retrying.status).toBe('queued');
    expect(retrying.last_error).toMatch(/451/);
    expect(retrying.last_error).toMatch(/temporarily unavailable/i);
    const [job] = await getSql()<{ attempts: number; last_error: string }[]>`
      select attempts, last_error from jobs where dedupe_key = ${`deliver:${key}`}`;
    expect(job!.attempts).toBeGreaterThanOrEqual(2);
    expect(job!.last_error).toMatch(/451/);

    // Let the next attempt be the last one.
    await getSql()`update jobs set max_attempts = attempts + 1 where dedupe_key = ${`deliver:${key}`}`;
    await waitForJobsSettled(['deliver-mail'], [`deliver:${key}`], 60_000);
    const [final] = await deliveriesTo(address);
    expect(final).toMatchObject({ status: 'failed', kind: 'digest' });
    expect(final!.last_error).toMatch(/451/);
    expect(final!.attempts).toBeGreaterThanOrEqual(3);
    // The job has stopped: `dead` from the queue, or `done` when a re-run found the row given up.
    const [stopped] = await getSql()<
      { status: string }[]
    >`select status from jobs where dedupe_key = ${`deliver:${key}`}`;
    expect(['dead', 'done']).toContain(stopped!.status);
    expect(await mailTo(address)).toEqual([]);
  });

  it('does not send a queued digest whose subscriber turned the digest off before delivery', async () => {
    const address = uniqueAddress('changed-mind+smtpfail');
    const due = timingDueNow('Europe/Lisbon');
    const sub = await subscribe(project, address, {
      digestDay: due.digestDay,
      digestHour: due.digestHour,
      timeZone: due.timeZone,
    });
    await enqueueDueDigests({ now: new Date() });
    const key = `digest:${sub.id}:${due.period.key}`;
    await waitUntil(
      'a failed first attempt',
      async () => ((await deliveriesTo(address))[0]?.attempts ?? 0) >= 1,
      60_000,
    );
    await getSql()`update subscriptions set weekly_digest = false where id = ${sub.id}`;
    await waitForJobsSettled(['deliver-mail'], [`deliver:${key}`], 60_000);
    const [row] = await deliveriesTo(address);
    expect(row).toMatchObject({ status: 'failed' });
    expect(row!.last_error).toMatch(/turned off before delivery/);
  });

  it('does nothing for a delivery that was already sent (a late duplicate job)', async () => {
    const address = uniqueAddress('once');
    const due = timingDueNow('UTC');
    await subscribe(project, address, { digestDay: due.digestDay, digestHour: due.digestHour, timeZone: due.timeZone });
    await enqueueDueDigests({ now: new Date() });
    const sent = await waitUntil(
      'a sent digest',
      async () => (await deliveriesTo(address)).find((r) => r.status === 'sent'),
      60_000,
    );
    const outcome = await deliverNotification({ dedupeKey: sent.dedupe_key, finalAttempt: false });
    expect(outcome).toEqual({ kind: 'already-sent' });
    await sleep(500);
    expect(await mailTo(address)).toHaveLength(1);
  });
});
