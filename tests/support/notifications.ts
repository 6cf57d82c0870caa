import { spawn, type ChildProcess } from 'node:child_process';
import { randomUUID } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { simpleParser, type ParsedMail } from 'mailparser';
import { getSql } from '@/db/client';
import type { Subscription } from '@/db/schema';
import { latestDigestPeriod, localDateTime, type DigestPeriod } from '@/src/lib/digest-schedule';
import { upsertSubscription } from '@/src/server/queries/subscriptions';
import { postRun, waitForRun, type TestProject } from './api';
import { required } from './env';
import { caughtMail, type CaughtMail } from './mail';

/** Helpers for the notification tests (digests, alerts, unsubscribe, delivery). */

/** A recipient address no other test uses, at an invented domain. */
export function uniqueAddress(local: string): string {
  return `${local}-${randomUUID().slice(0, 8)}@saltmarsh-lab.example`;
}

/** Digest timing whose latest due moment is the start of the current local hour in `timeZone`. */
export function timingDueNow(
  timeZone: string,
  now: Date = new Date(),
): { digestDay: number; digestHour: number; timeZone: string; period: DigestPeriod } {
  const local = localDateTime(now, timeZone);
  const timing = { digestDay: local.weekday, digestHour: local.hour, timeZone };
  return { ...timing, period: latestDigestPeriod(timing, now) };
}

export async function subscribe(
  project: Pick<TestProject, 'workspaceId' | 'projectId'>,
  email: string,
  settings: Partial<
    Pick<Subscription, 'weeklyDigest' | 'failureAlerts' | 'digestDay' | 'digestHour' | 'timeZone'>
  > = {},
  userId: string | null = null,
): Promise<Subscription> {
  return upsertSubscription({
    workspaceId: project.workspaceId,
    projectId: project.projectId,
    userId,
    email,
    settings: { weeklyDigest: true, failureAlerts: false, digestDay: 1, digestHour: 8, timeZone: 'UTC', ...settings },
  });
}

/** Messages the catcher holds for `address` (To: header). */
export async function mailTo(address: string): Promise<CaughtMail[]> {
  return (await caughtMail()).filter((m) => m.to.includes(address));
}

/** Waits until `count` messages for `address` have arrived, and returns them. */
export async function waitForMailTo(address: string, count = 1, timeoutMs = 45_000): Promise<CaughtMail[]> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const found = await mailTo(address);
    if (found.length >= count) return found;
    if (Date.now() > deadline) throw new Error(`expected ${count} mail(s) to ${address}, got ${found.length}`);
    await sleep(250);
  }
}

/** The raw message as the catcher received it, parsed again (headers exactly as sent). */
export async function parsedMail(id: string): Promise<{ raw: string; parsed: ParsedMail }> {
  const res = await fetch(`${required('MAIL_CATCHER_URL')}/messages/${id}.eml`);
  if (!res.ok) throw new Error(`catcher answered ${res.status} for ${id}.eml`);
  const raw = await res.text();
  return { raw, parsed: await simpleParser(raw) };
}

/** A header of a raw message, unfolded. */
export function rawHeader(raw: string, name: string): string | undefined {
  const head = raw.split(/\r?\n\r?\n/)[0] ?? '';
  const unfolded = head.replace(/\r?\n[ \t]+/g, ' ');
  const line = unfolded.split(/\r?\n/).find((l) => l.toLowerCase().startsWith(`${name.toLowerCase()}:`));
  return line?.slice(name.length + 1).trim();
}

export function sleep(ms: number): Promise<void> {
  return new Promise((resolve) => setTimeout(resolve, ms));
}

/** Polls `check` until it returns a value other than undefined/false. */
export async function waitUntil<T>(
  what: string,
  check: () => Promise<T | undefined | false>,
  timeoutMs = 45_000,
): Promise<T> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const value = await check();
    if (value !== undefined && value !== false) return value;
    if (Date.now() > deadline) throw new Error(`timed out waiting for ${what}`);
    await sleep(200);
  }
}

/** Waits until no job of `kinds` whose dedupe key starts with one of `prefixes` is queued or running. */
export async function waitForJobsSettled(kinds: string[], prefixes: string[], timeoutMs = 60_000): Promise<void> {
  await waitUntil(
    `jobs ${prefixes.join(', ')} to settle`,
    async () => {
      const patterns = prefixes.map((p) => `${p}%`);
      const [row] = await getSql()<{ n: number }[]>`
        select count(*)::int as n from jobs
        where kind = any(${kinds}) and dedupe_key like any(${patterns}) and status in ('queued', 'running')`;
      return row?.n === 0;
    },
    timeoutMs,
  );
}

export interface PostedRun {
  id: string;
  build: string;
  case: string;
}

/** Posts runs (one file per case) for a build and waits until every one is analysed. */
export async function postBuild(
  project: TestProject,
  build: string,
  cases: Record<string, string>,
  options: { branch?: string; commit?: string } = {},
): Promise<Record<string, PostedRun>> {
  const out: Record<string, PostedRun> = {};
  for (const [name, file] of Object.entries(cases)) {
    const res = await postRun(
      project.token,
      { build, case: name, branch: options.branch ?? 'main', commit: options.commit ?? `c-${build}` },
      { path: file },
    );
    if (res.status !== 202)
      throw new Error(`posting ${build}/${name} answered ${res.status}: ${JSON.stringify(res.body)}`);
    out[name] = { id: res.body.run.id as string, build, case: name };
  }
  for (const r of Object.values(out)) await waitForRun(project.token, r.id, 90_000);
  return out;
}

/** Moves a build and its runs to `at` (as if CI had run it then). */
export async function backdateBuild(project: Pick<TestProject, 'projectId'>, key: string, at: Date): Promise<void> {
  const sql = getSql();
  const iso = at.toISOString();
  const [build] = await sql<{ id: string }[]>`
    update builds set started_at = ${iso}::timestamptz, finished_at = ${iso}::timestamptz + interval '5 minutes'
    where project_id = ${project.projectId} and key = ${key} returning id`;
  if (!build) throw new Error(`no build ${key}`);
  await sql`update runs set queued_at = ${iso}::timestamptz, created_at = ${iso}::timestamptz,
    started_at = ${iso}::timestamptz, finished_at = ${iso}::timestamptz + interval '1 minute' where build_id = ${build.id}`;
}

/** A real worker process (scripts/worker.ts) in its own process group. */
export function spawnWorker(extraEnv: Record<string, string> = {}): ChildProcess {
  const logFile = path.join(
    required('VARIGATE_TEST_DATA_DIR'),
    'logs',
    `notification-worker-${Date.now()}-${randomUUID().slice(0, 4)}.log`,
  );
  const out = fs.openSync(logFile, 'a');
  return spawn(
    path.join(process.cwd(), 'node_modules', '.bin', 'tsx'),
    ['--conditions=react-server', 'scripts/worker.ts'],
    {
      env: { ...process.env, NODE_ENV: 'production', VARIGATE_PROCESS: 'test-worker', ...extraEnv },
      stdio: ['ignore', out, out],
      detached: true,
    },
  );
}

export function signalGroup(pid: number, signal: NodeJS.Signals): void {
  try {
    process.kill(-pid, signal);
  } catch {
    try {
      process.kill(pid, signal);
    } catch {
      // already gone
    }
  }
}

/** The suite's shared worker (started by scripts/test.mjs), to pause while a test runs its own. */
export function sharedWorkerPid(): number {
  return Number(fs.readFileSync(required('VARIGATE_TEST_WORKER_PID_FILE'), 'utf8'));
}

export interface DeliveryRow {
  id: number;
  kind: string;
  recipient: string;
  status: string;
  attempts: number;
  last_error: string | null;
  message_id: string | null;
  dedupe_key: string;
  payload: Record<string, unknown>;
}

export async function deliveriesTo(recipient: string): Promise<DeliveryRow[]> {
  const rows = await getSql()<DeliveryRow[]>`
    select id, kind, recipient, status, attempts, last_error, message_id, dedupe_key, payload
    from mail_deliveries where recipient = ${recipient} order by id`;
  return rows.map((r) => ({ ...r, id: Number(r.id) }));
}
