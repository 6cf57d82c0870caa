import type { ChildProcess } from 'node:child_process';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { getSql } from '@/db/client';
import { insertUser } from '@/src/server/queries/users';
import { jobHandlers } from '@/src/server/jobs';
import { SEND_DIGEST_JOB, DELIVER_MAIL_JOB, DIGEST_TICK_JOB } from '@/src/server/jobs/notification-names';
import { startWorker } from '@/src/server/queue';
import { enqueueDueDigests, kickOffDigestScheduler, runDigestTick } from '@/src/server/services/digests';
import { sendMyDigestPreview } from '@/src/server/services/notifications';
import { createTestProject, fixturePath, type TestProject } from '../support/api';
import { appUrl } from '../support/env';
import {
  backdateBuild,
  deliveriesTo,
  mailTo,
  parsedMail,
  postBuild,
  rawHeader,
  sharedWorkerPid,
  signalGroup,
  sleep,
  spawnWorker,
  subscribe,
  timingDueNow,
  uniqueAddress,
  waitForJobsSettled,
  waitForMailTo,
  waitUntil,
} from '../support/notifications';

const PASS = fixturePath('snapshots', 'tophat-van-leer.csv');
const FAIL = fixturePath('snapshots', 'tophat-lax-wendroff.csv');
const DAY = 86_400_000;
// A zone whose hours begin at a quarter past the UTC hour, to keep the scheduler honest.
const ZONE = 'Pacific/Chatham';

/** Waits until the digest jobs and deliveries of these subscriptions have all finished. */
async function settleDigests(subscriptionIds: string[]): Promise<void> {
  await waitForJobsSettled(
    [SEND_DIGEST_JOB],
    subscriptionIds.map((id) => `send-digest:${id}:`),
  );
  await waitForJobsSettled(
    [DELIVER_MAIL_JOB],
    subscriptionIds.map((id) => `deliver:digest:${id}:`),
  );
}

describe('weekly digest of a seeded week, through SMTP', () => {
  let project: TestProject;
  let due: ReturnType<typeof timingDueNow>;
  const lead = uniqueAddress('lead');
  const list = uniqueAddress('tracer-list');
  const quiet = uniqueAddress('quiet');
  let leadSubId: string;
  let listSubId: string;
  let quietSubId: string;
  let runIds: Record<string, Record<string, string>> = {};

  beforeAll(async () => {
    project = await createTestProject('tracer-digest');
    due = timingDueNow(ZONE);
    const E = due.period.end.getTime();
    // Six builds on main: one old, two the week before, three this week; one on a branch; one after the end.
    const plan: { key: string; at: number; branch?: string; cases: Record<string, string> }[] = [
      {
        key: 'nightly-old',
        at: E - 20 * DAY,
        cases: { 'estuary-front': PASS, 'plume-edge': PASS, 'tidal-bore': PASS, 'sill-overflow': FAIL },
      },
      {
        key: 'nightly-w1a',
        at: E - 10 * DAY,
        cases: { 'estuary-front': PASS, 'plume-edge': FAIL, 'tidal-bore': PASS, 'sill-overflow': FAIL },
      },
      {
        key: 'nightly-w1b',
        at: E - 9 * DAY,
        cases: { 'estuary-front': PASS, 'plume-edge': FAIL, 'tidal-bore': PASS, 'sill-overflow': FAIL },
      },
      {
        key: 'nightly-w2a',
        at: E - 5 * DAY,
        cases: { 'estuary-front': PASS, 'plume-edge': PASS, 'tidal-bore': PASS, 'sill-overflow': FAIL },
      },
      {
        key: 'nightly-w2b',
        at: E - 3 * DAY,
        cases: { 'estuary-front': FAIL, 'plume-edge': PASS, 'tidal-bore': PASS, 'sill-overflow': FAIL },
      },
      {
        key: 'nightly-w2c',
        at: E - 1 * DAY,
        cases: { 'estuary-front': FAIL, 'plume-edge': PASS, 'tidal-bore': PASS, 'sill-overflow': FAIL },
      },
      { key: 'limiter-try-1', at: E - 2 * DAY, branch: 'feature/limiter', cases: { 'estuary-front': FAIL } },
      { key: 'nightly-next', at: E + 60_000, cases: { 'estuary-front': FAIL, 'plume-edge': FAIL } },
    ];
    for (const b of plan) {
      const posted = await postBuild(project, b.key, b.cases, { branch: b.branch });
      runIds[b.key] = Object.fromEntries(Object.entries(posted).map(([c, r]) => [c, r.id]));
      await backdateBuild(project, b.key, new Date(b.at));
    }
    const user = await insertUser({ email: lead, name: 'Tracer lead' });
    leadSubId = (
      await subscribe(project, lead, { digestDay: due.digestDay, digestHour: due.digestHour, timeZone: ZONE }, user.id)
    ).id;
    listSubId = (
      await subscribe(project, list, { digestDay: due.digestDay, digestHour: due.digestHour, timeZone: ZONE })
    ).id;
    // Same timing, digest switched off: must get nothing.
    quietSubId = (
      await subscribe(project, quiet, {
        weeklyDigest: false,
        digestDay: due.digestDay,
        digestHour: due.digestHour,
        timeZone: ZONE,
      })
    ).id;
  }, 300_000);

  afterAll(() => {
    runIds = {};
  });

  it('sends one digest per subscriber with the week counts, the changes and working links', async () => {
    const found = await enqueueDueDigests({ now: new Date() });
    expect(found).toBeGreaterThanOrEqual(2);
    const [mail] = await waitForMailTo(lead);
    await waitForMailTo(list);
    await settleDigests([leadSubId, listSubId, quietSubId]);
    expect(await mailTo(lead)).toHaveLength(1);
    expect(await mailTo(list)).toHaveLength(1);

    const { raw, parsed } = await parsedMail(mail!.id);
    const text = parsed.text ?? '';
    const html = typeof parsed.html === 'string' ? parsed.html : '';
    const ws = (await getSql()<{ slug: string }[]>`select slug from workspaces where id = ${project.workspaceId}`)[0]!
      .slug;
    const base = `${appUrl()}/w/${ws}`;

    expect(parsed.subject).toMatch(/weekly digest, 1 case started failing$/);
    // Three builds on main this week, all failing (sill-overflow fails in every build); one on a branch.
    expect(text).toContain('3 builds on main (3 fail); 1 more build on other branches.');
    // 7 of 12 case runs passed this week, 4 of 8 the week before.
    expect(text).toContain(
      'Pass rate: 58.3 % (7 of 12 case runs passed or warned); +8.3 points from 50.0 % the week before.',
    );
    expect(text).toMatch(/Started failing \(1\)\n- estuary-front: first failing build nightly-w2b/);
    expect(text).toMatch(/worst finding: \S/);
    expect(text).toContain(`${base}/runs/${runIds['nightly-w2b']!['estuary-front']}`);
    expect(text).toMatch(/Fixed \(1\)\n- plume-edge: passes again since build nightly-w2a/);
    expect(text).toContain('- sill-overflow: failing since build nightly-old');
    expect(text).toContain('6 failing builds in a row');
    // Builds outside the week and on other branches are not listed.
    expect(text).not.toContain('nightly-next');
    expect(text).not.toContain('nightly-w1a');
    expect(text).toContain(`${base}/projects/tracer-digest/builds/nightly-w2c`);
    expect(text).toContain(`Project: ${base}/projects/tracer-digest`);
    expect(text).toContain(`${base}/settings/notifications`);
    expect(text).toMatch(/does not validate the physics/);
    // HTML part: same facts, links, no images.
    expect(html).toContain(`href="${base}/projects/tracer-digest/builds/nightly-w2b"`);
    expect(html).toContain('58.3 %');
    expect(html).not.toMatch(/<img/i);
    // RFC 2369 / RFC 8058 headers; the one-click target is the app's handler.
    expect(rawHeader(raw, 'List-Unsubscribe')).toMatch(
      new RegExp(`^<${appUrl()}/unsubscribe/one-click\\?token=[\\w.%-]+>$`),
    );
    expect(rawHeader(raw, 'List-Unsubscribe-Post')).toBe('List-Unsubscribe=One-Click');
    expect(rawHeader(raw, 'Message-ID')).toMatch(/^<digest\.[0-9a-f]{32}@/);
    expect(text).toMatch(new RegExp(`Unsubscribe from this digest: ${appUrl()}/unsubscribe\\?token=`));

    const [delivery] = await deliveriesTo(lead);
    expect(delivery).toMatchObject({ kind: 'digest', status: 'sent', attempts: 1, last_error: null });
    expect(delivery!.dedupe_key).toBe(`digest:${leadSubId}:${due.period.key}`);
  });

  it('sends nothing to a subscription with the digest switched off', async () => {
    await enqueueDueDigests({ now: new Date() });
    await settleDigests([quietSubId]);
    expect(await mailTo(quiet)).toEqual([]);
    expect(await deliveriesTo(quiet)).toEqual([]);
  });

  it('sends a preview on request, marked as such, at most once a minute', async () => {
    const member = {
      workspaceId: project.workspaceId,
      userId: (await getSql()<{ user_id: string }[]>`select user_id from subscriptions where id = ${leadSubId}`)[0]!
        .user_id,
      email: lead,
      role: 'viewer' as const,
    };
    await sendMyDigestPreview(member, { projectId: project.projectId, timeZone: 'Europe/Oslo' });
    await expect(sendMyDigestPreview(member, { projectId: project.projectId })).rejects.toThrow(
      /less than a minute ago/,
    );
    const mails = await waitForMailTo(lead, 2);
    const preview = mails.find((m) => m.subject.startsWith('[Preview]'));
    expect(preview).toBeDefined();
    expect(preview!.text).toContain('PREVIEW');
    expect(preview!.text).toContain('(Europe/Oslo)');
    await sleep(1500);
    expect((await mailTo(lead)).filter((m) => m.subject.startsWith('[Preview]'))).toHaveLength(1);
  });
});

describe('exactly one digest per subscriber and period', () => {
  let project: TestProject;
  const stop: (() => Promise<void>)[] = [];
  const children: ChildProcess[] = [];
  let pausedShared = false;

  beforeAll(async () => {
    project = await createTestProject('exactly-once');
    await postBuild(project, 'nightly-1', { 'lagoon-mix': PASS });
  });

  afterAll(async () => {
    for (const s of stop) await s();
    for (const c of children) signalGroup(c.pid!, 'SIGKILL');
    if (pausedShared) signalGroup(sharedWorkerPid(), 'SIGCONT');
  });

  it('sends once with two workers in this process, the shared worker and repeated scheduler ticks', async () => {
    const due = timingDueNow('America/St_Johns'); // UTC-03:30
    const addresses = [uniqueAddress('twice-a'), uniqueAddress('twice-b'), uniqueAddress('twice-c')];
    const subs = await Promise.all(
      addresses.map((a) =>
        subscribe(project, a, { digestDay: due.digestDay, digestHour: due.digestHour, timeZone: due.timeZone }),
      ),
    );
    const a = startWorker({ handlers: jobHandlers, pollMs: 50, workerId: 'digest-test-a' });
    const b = startWorker({ handlers: jobHandlers, pollMs: 50, workerId: 'digest-test-b' });
    stop.push(a.stop, b.stop);
    // Several schedulers at once: two ticks, the start-up kick and two bare scans.
    await Promise.all([
      runDigestTick(),
      runDigestTick(),
      kickOffDigestScheduler(),
      enqueueDueDigests({ now: new Date() }),
      enqueueDueDigests({ now: new Date() }),
    ]);
    for (const address of addresses) await waitForMailTo(address);
    await settleDigests(subs.map((s) => s.id));
    // And once more after everything was sent: nothing new.
    await enqueueDueDigests({ now: new Date() });
    await settleDigests(subs.map((s) => s.id));
    await Promise.all([a.stop(), b.stop()]);
    stop.length = 0;
    for (const address of addresses) {
      expect(await mailTo(address)).toHaveLength(1);
      const rows = await deliveriesTo(address);
      expect(rows.map((r) => [r.status, r.attempts])).toEqual([['sent', 1]]);
    }
    // The tick re-enqueued itself for the next hour.
    const next = await getSql()<
      { n: number }[]
    >`select count(*)::int as n from jobs where kind = ${DIGEST_TICK_JOB} and status = 'queued' and run_at > now()`;
    expect(next[0]!.n).toBe(1);
  });

  it('sends once when the worker holding the delivery is killed mid-send and another worker starts', async () => {
    const due = timingDueNow('Asia/Kathmandu'); // UTC+05:45
    const address = uniqueAddress('restart');
    const sub = await subscribe(project, address, {
      digestDay: due.digestDay,
      digestHour: due.digestHour,
      timeZone: due.timeZone,
    });
    // Only this test's workers may take jobs now.
    signalGroup(sharedWorkerPid(), 'SIGSTOP');
    pausedShared = true;
    const doomed = spawnWorker({ VARIGATE_MAIL_SEND_DELAY_MS: '60000' });
    children.push(doomed);
    await enqueueDueDigests({ now: new Date() });
    // Wait until the doomed worker is in the delivery job: it locks the row at once and then
    // sleeps before SMTP. (Probing the row lock from here would disturb it, so give it a moment.)
    const key = `digest:${sub.id}:${due.period.key}`;
    await waitUntil(
      'the doomed worker to start delivering',
      async () => {
        const rows = await getSql()`select 1 from jobs where dedupe_key = ${`deliver:${key}`} and status = 'running'`;
        return rows.length > 0;
      },
      60_000,
    );
    await sleep(1500);
    const [inFlight] = await deliveriesTo(address);
    expect(inFlight).toMatchObject({ status: 'queued', attempts: 0 });
    signalGroup(doomed.pid!, 'SIGKILL');
    const successor = spawnWorker();
    children.push(successor);
    await waitForMailTo(address, 1, 60_000);
    // The successor's start-up kicked the scheduler again; scan once more as a restarted tick would.
    await enqueueDueDigests({ now: new Date() });
    await settleDigests([sub.id]);
    signalGroup(sharedWorkerPid(), 'SIGCONT');
    pausedShared = false;
    await sleep(1000);
    expect(await mailTo(address)).toHaveLength(1);
    const rows = await deliveriesTo(address);
    expect(rows.map((r) => [r.status, r.attempts])).toEqual([['sent', 1]]);
    const [job] = await getSql()<
      { attempts: number; status: string }[]
    >`select attempts, status from jobs where dedupe_key = ${`deliver:${key}`}`;
    expect(job).toEqual({ attempts: 2, status: 'done' });
  });
});
