import 'server-only';
import os from 'node:os';
import { randomUUID } from 'node:crypto';
import type postgres from 'postgres';
import { eq, sql } from 'drizzle-orm';
import { getDb, getSql, type Executor } from '@/db/client';
import { jobs } from '@/db/schema';
import { logger } from './logger';

/**
 * A small job queue in PostgreSQL (table `jobs`). Why our own rather than a queue library: a
 * worker holds a lease that it renews while it works, so a long analysis is never taken from a
 * live worker, and a job whose worker was killed is claimed again as soon as its lease runs out
 * (seconds, not a maintenance interval). Claiming uses FOR UPDATE SKIP LOCKED, so any number of
 * workers on any number of machines share one table without taking the same job.
 */

export interface JobRow {
  id: number;
  kind: string;
  payload: Record<string, unknown>;
  attempts: number;
  maxAttempts: number;
}

export interface EnqueueInput {
  kind: string;
  payload: Record<string, unknown>;
  /** A second enqueue with the same key is a no-op (returns the existing job's id). */
  dedupeKey?: string;
  runAt?: Date;
  maxAttempts?: number;
}

type Sql = postgres.Sql;

/**
 * Enqueues a job. Pass the open transaction so that the job commits together with the rows it
 * refers to (a run and its analysis job appear at once or not at all).
 */
export async function enqueue(input: EnqueueInput, db: Executor = getDb()): Promise<number> {
  const [row] = await db
    .insert(jobs)
    .values({
      kind: input.kind,
      payload: input.payload,
      dedupeKey: input.dedupeKey ?? null,
      runAt: input.runAt ?? new Date(),
      maxAttempts: input.maxAttempts ?? 5,
    })
    // Re-enqueueing with the same key returns the existing job untouched.
    .onConflictDoUpdate({ target: jobs.dedupeKey, set: { dedupeKey: sql`excluded.dedupe_key` } })
    .returning({ id: jobs.id });
  return row!.id;
}

/** Puts a finished or dead job back in the queue (re-analysis with another policy, say). */
export async function requeue(dedupeKey: string, db: Executor = getDb()): Promise<void> {
  await db
    .update(jobs)
    .set({
      status: 'queued',
      runAt: new Date(),
      attempts: 0,
      lastError: null,
      lockedBy: null,
      lockedUntil: null,
      finishedAt: null,
    })
    .where(eq(jobs.dedupeKey, dedupeKey));
}

async function claim(sql: Sql, kinds: string[], workerId: string, leaseSeconds: number): Promise<JobRow | undefined> {
  const rows = await sql<JobRow[]>`
    update jobs set status = 'running', locked_by = ${workerId},
      locked_until = now() + make_interval(secs => ${leaseSeconds}), attempts = attempts + 1
    where id = (
      select id from jobs
      where kind = any(${kinds})
        and ((status = 'queued' and run_at <= now()) or (status = 'running' and locked_until < now()))
      order by run_at, id
      for update skip locked
      limit 1)
    returning id, kind, payload, attempts, max_attempts as "maxAttempts"`;
  const row = rows[0];
  return row ? { ...row, id: Number(row.id) } : undefined;
}

async function complete(sql: Sql, id: number, workerId: string): Promise<void> {
  await sql`update jobs set status = 'done', finished_at = now(), locked_by = null, locked_until = null
    where id = ${id} and locked_by = ${workerId}`;
}

/** Exponential backoff: 2 s, 4 s, 8 s ... capped at 5 minutes. */
export function backoffSeconds(attempt: number): number {
  return Math.min(300, 2 ** Math.max(1, attempt));
}

async function fail(sql: Sql, job: JobRow, workerId: string, error: string, permanent: boolean): Promise<void> {
  const dead = permanent || job.attempts >= job.maxAttempts;
  await sql`update jobs set
      status = ${dead ? 'dead' : 'queued'},
      run_at = now() + make_interval(secs => ${dead ? 0 : backoffSeconds(job.attempts)}),
      last_error = ${error.slice(0, 4000)}, locked_by = null, locked_until = null,
      finished_at = case when ${dead} then now() else null end
    where id = ${job.id} and locked_by = ${workerId}`;
}

/** Thrown by a handler for a failure that retrying cannot fix (bad input, missing row). */
export class PermanentJobError extends Error {
  override readonly name = 'PermanentJobError';
}

export type JobHandler = (job: JobRow) => Promise<void>;

export interface WorkerOptions {
  handlers: Record<string, JobHandler>;
  leaseSeconds?: number;
  pollMs?: number;
  workerId?: string;
}

/**
 * Runs jobs until `stop()` is called: claims one, renews its lease every third of the lease while
 * the handler runs, marks it done, or schedules a retry with backoff. Returns a handle whose
 * `stop()` resolves once the current job has finished.
 */
export function startWorker(options: WorkerOptions): { stop: () => Promise<void>; workerId: string } {
  const sql = getSql();
  const workerId = options.workerId ?? `${os.hostname()}:${process.pid}:${randomUUID().slice(0, 8)}`;
  const leaseSeconds = options.leaseSeconds ?? Number(process.env.VARIGATE_JOB_LEASE_SECONDS ?? 30);
  const pollMs = options.pollMs ?? 500;
  const kinds = Object.keys(options.handlers);
  let stopping = false;

  const loop = async (): Promise<void> => {
    while (!stopping) {
      let job: JobRow | undefined;
      try {
        job = await claim(sql, kinds, workerId, leaseSeconds);
      } catch (err) {
        logger.error({ err }, 'could not claim a job; retrying');
        await sleep(Math.max(pollMs, 2000));
        continue;
      }
      if (!job) {
        await sleep(pollMs);
        continue;
      }
      await runJob(sql, job, options.handlers[job.kind]!, workerId, leaseSeconds);
    }
  };
  const done = loop();
  return {
    workerId,
    stop: async () => {
      stopping = true;
      await done;
    },
  };
}

async function runJob(
  sql: Sql,
  job: JobRow,
  handler: JobHandler,
  workerId: string,
  leaseSeconds: number,
): Promise<void> {
  const log = logger.child({ jobId: job.id, kind: job.kind, attempt: job.attempts });
  const renew = setInterval(
    () => {
      sql`update jobs set locked_until = now() + make_interval(secs => ${leaseSeconds})
        where id = ${job.id} and locked_by = ${workerId}`.catch((err: unknown) =>
        log.warn({ err }, 'lease renewal failed'),
      );
    },
    (leaseSeconds * 1000) / 3,
  );
  const started = performance.now();
  try {
    await handler(job);
    await complete(sql, job.id, workerId);
    log.info({ ms: Math.round(performance.now() - started) }, 'job done');
  } catch (err) {
    const permanent = err instanceof PermanentJobError;
    const message = err instanceof Error ? err.message : String(err);
    log.error({ err, permanent }, 'job failed');
    await fail(sql, job, workerId, message, permanent).catch((e: unknown) =>
      log.error({ err: e }, 'could not record job failure'),
    );
  } finally {
    clearInterval(renew);
  }
}

function sleep(ms: number): Promise<void> {
  return new Promise((resolve) => setTimeout(resolve, ms));
}

/**
 * Runs the given handlers in this process until no job of their kinds is queued or running
 * (used by the demo seed, so that `npm start` opens on analysed data).
 */
export async function runUntilIdle(options: { handlers: Record<string, JobHandler>; pollMs?: number }): Promise<void> {
  const sql = getSql();
  const kinds = Object.keys(options.handlers);
  const worker = startWorker({ handlers: options.handlers, pollMs: options.pollMs ?? 100, leaseSeconds: 60 });
  try {
    for (;;) {
      const [row] = await sql<{ n: number }[]>`
        select count(*)::int as n from jobs
        where kind = any(${kinds}) and (status = 'queued' or (status = 'running' and locked_until > now()))`;
      if (!row || row.n === 0) return;
      await sleep(200);
    }
  } finally {
    await worker.stop();
  }
}
