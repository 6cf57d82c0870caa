import { spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { getSql } from '@/db/client';
import { createTestProject, fixturePath, postRun, waitForRun, type TestProject } from '../support/api';
import { appUrl, required } from '../support/env';

const laxWendroff = fixturePath('snapshots', 'tophat-lax-wendroff.csv');

/** A real worker process, in its own process group so that SIGKILL takes all of it. */
function spawnWorker(extraEnv: Record<string, string> = {}): ChildProcess {
  const logFile = path.join(required('VARIGATE_TEST_DATA_DIR'), 'logs', `test-worker-${Date.now()}.log`);
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

function killGroup(child: ChildProcess, signal: NodeJS.Signals): void {
  try {
    process.kill(-child.pid!, signal);
  } catch {
    // already gone
  }
}

async function waitForStatus(token: string, id: string, status: string, timeoutMs = 30_000): Promise<void> {
  const deadline = Date.now() + timeoutMs;
  while (Date.now() < deadline) {
    const res = await request(appUrl()).get(`/api/v1/runs/${id}`).set('Authorization', `Bearer ${token}`);
    if (res.body.run?.status === status) return;
    await new Promise((r) => setTimeout(r, 50));
  }
  throw new Error(`run ${id} never reached status ${status}`);
}

describe('the analysis worker under failure', () => {
  let project: TestProject;
  let sharedWorkerPid: number;
  const started: ChildProcess[] = [];

  beforeAll(async () => {
    project = await createTestProject();
    sharedWorkerPid = Number(fs.readFileSync(required('VARIGATE_TEST_WORKER_PID_FILE'), 'utf8'));
  });

  afterAll(() => {
    for (const child of started) killGroup(child, 'SIGKILL');
    // Let the suite's own worker go on with the other tests.
    try {
      process.kill(-sharedWorkerPid, 'SIGCONT');
    } catch {
      process.kill(sharedWorkerPid, 'SIGCONT');
    }
  });

  it('finishes a run with the same verdict after its worker is killed mid-job and a new worker starts', async () => {
    const reference = await postRun(project.token, { build: 'kill-1', case: 'reference' }, { path: laxWendroff });
    const expected = await waitForRun(project.token, reference.body.run.id);

    // Pause the suite's worker so that only the workers of this test take jobs.
    process.kill(-sharedWorkerPid, 'SIGSTOP');
    const doomed = spawnWorker({ VARIGATE_ANALYSIS_STEP_DELAY_MS: '400', VARIGATE_JOB_LEASE_SECONDS: '3' });
    started.push(doomed);
    const posted = await postRun(project.token, { build: 'kill-1', case: 'victim' }, { path: laxWendroff });
    expect(posted.status).toBe(202);
    await waitForStatus(project.token, posted.body.run.id, 'analysing');
    killGroup(doomed, 'SIGKILL');

    const successor = spawnWorker();
    started.push(successor);
    const report = await waitForRun(project.token, posted.body.run.id, 60_000);
    expect(report.run.status).toBe('done');
    expect(report.run.verdict).toBe(expected.run.verdict);
    expect(report.findings.map((f: { kind: string; step: number }) => [f.kind, f.step])).toEqual(
      expected.findings.map((f: { kind: string; step: number }) => [f.kind, f.step]),
    );
    // The job was claimed twice (the killed attempt and the finishing one), and results exist once.
    const [job] = await getSql()<{ attempts: number; status: string }[]>`
      select attempts, status from jobs where dedupe_key = ${`analyse:${posted.body.run.id}`}`;
    expect(job).toEqual({ attempts: 2, status: 'done' });
    const [vars] = await getSql()<
      { n: number }[]
    >`select count(*)::int as n from variables where run_id = ${posted.body.run.id}`;
    expect(vars!.n).toBe(report.variables.length);
  });

  it('lets two workers share the queue without analysing any run twice', async () => {
    process.kill(-sharedWorkerPid, 'SIGCONT');
    const ids: string[] = [];
    for (let i = 0; i < 8; i++) {
      const res = await postRun(project.token, { build: 'two-workers', case: `case-${i}` }, { path: laxWendroff });
      ids.push(res.body.run.id as string);
    }
    for (const id of ids) await waitForRun(project.token, id, 60_000);
    const rows = await getSql()<{ attempts: number }[]>`
      select attempts from jobs where dedupe_key = any(${ids.map((id) => `analyse:${id}`)})`;
    expect(rows).toHaveLength(8);
    expect(rows.every((r) => r.attempts === 1)).toBe(true);
  });
});
