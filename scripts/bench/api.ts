/**
 * Upload API under load: `npm run bench -- api`.
 *
 * Starts throwaway services (like `npm test`), one app instance (`next start` on the last test
 * build, building it when missing) and one worker, then runs CONCURRENCY simulated CI clients
 * that each post 1 MB CSV uploads back to back for DURATION seconds. Reports failed requests,
 * POST latency percentiles, whether every 202 ended in a verdict (no lost upload), and the time
 * from POST to verdict. A small load generator of our own rather than a load-testing package:
 * it needs multipart bodies and exact percentiles over every request, and nothing else.
 *
 * VARIGATE_BENCH_API_SECONDS (default 60), VARIGATE_BENCH_API_CLIENTS (default 20).
 */
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { pathToFileURL } from 'node:url';
import { cellCentres, formatLongCsv } from '@/src/lib/snapshot-csv';
import { runAdvection1d, topHat } from '@/src/analysis/schemes';

const DURATION_S = Number(process.env.VARIGATE_BENCH_API_SECONDS ?? 60);
const CLIENTS = Number(process.env.VARIGATE_BENCH_API_CLIENTS ?? 20);
const root = path.resolve(import.meta.dirname, '..', '..');
const bin = (name: string) => path.join(root, 'node_modules', '.bin', name);

interface ServicesModule {
  freePort(): Promise<number>;
  startAll(o: {
    dataDir: string;
    ports: Record<string, number>;
    fast: boolean;
  }): Promise<{ env: Record<string, string> }>;
  stopAll(o: { dataDir: string }): Promise<void>;
}

/** About 1 MB of long-layout CSV: a van Leer top hat, 1,000 cells, 31 steps. */
function megabyteCsv(): string {
  const cells = 1000;
  const snaps = runAdvection1d({
    initial: topHat(cells, 200, 200),
    courant: 0.5,
    steps: 30,
    scheme: 'limited',
    limiter: 'van-leer',
  });
  return formatLongCsv({
    steps: snaps.map((_, k) => k),
    times: snaps.map((_, k) => k * 0.0005),
    axes: [{ name: 'x', centres: cellCentres(cells) }],
    variables: { c: snaps },
    digits: 17,
  });
}

function percentile(sorted: number[], p: number): number {
  if (sorted.length === 0) return Number.NaN;
  return sorted[Math.min(sorted.length - 1, Math.ceil((p / 100) * sorted.length) - 1)]!;
}

async function waitHttp(url: string, timeoutMs = 120_000): Promise<void> {
  const deadline = Date.now() + timeoutMs;
  while (Date.now() < deadline) {
    try {
      if ((await fetch(url)).ok) return;
    } catch {
      // not up yet
    }
    await new Promise((r) => setTimeout(r, 500));
  }
  throw new Error(`${url} did not come up`);
}

function runCommand(cmd: string, args: string[], env: NodeJS.ProcessEnv): void {
  const r = spawnSync(cmd, args, { cwd: root, env, stdio: 'inherit' });
  if (r.status !== 0) throw new Error(`${cmd} ${args.join(' ')} failed`);
}

async function createToken(env: NodeJS.ProcessEnv): Promise<string> {
  const r = spawnSync(bin('tsx'), ['--conditions=react-server', 'scripts/seed-bench.ts'], {
    cwd: root,
    env,
    encoding: 'utf8',
  });
  if (r.status !== 0) throw new Error(`could not create the bench project: ${r.stderr}`);
  return r.stdout.trim().split('\n').pop()!;
}

interface ClientStats {
  latencies: number[];
  failures: Map<string, number>;
  runIds: string[];
}

async function client(
  appUrl: string,
  token: string,
  body: Blob,
  until: number,
  id: number,
  stats: ClientStats,
): Promise<void> {
  let n = 0;
  while (Date.now() < until) {
    const form = new FormData();
    form.set('build', `bench-${id}`);
    form.set('commit', 'beefcafe');
    form.set('branch', 'main');
    form.set('case', `client-${id}`);
    form.set('file', body, 'bench.csv');
    const started = performance.now();
    try {
      const res = await fetch(`${appUrl}/api/v1/runs`, {
        method: 'POST',
        headers: { authorization: `Bearer ${token}`, 'idempotency-key': `bench-${id}-${n++}` },
        body: form,
      });
      const text = await res.text();
      stats.latencies.push(performance.now() - started);
      if (res.status === 202) stats.runIds.push((JSON.parse(text) as { run: { id: string } }).run.id);
      else stats.failures.set(`HTTP ${res.status}`, (stats.failures.get(`HTTP ${res.status}`) ?? 0) + 1);
    } catch (err) {
      const key = (err as Error).message;
      stats.failures.set(key, (stats.failures.get(key) ?? 0) + 1);
    }
  }
}

async function verdictTimes(appUrl: string, token: string, ids: string[], timeoutMs: number) {
  const deadline = Date.now() + timeoutMs;
  const pending = new Set(ids);
  const times: number[] = [];
  while (pending.size > 0 && Date.now() < deadline) {
    for (const id of [...pending].slice(0, 200)) {
      const res = await fetch(`${appUrl}/api/v1/runs/${id}`, { headers: { authorization: `Bearer ${token}` } });
      const body = (await res.json()) as { run: { status: string; queuedAt: string; finishedAt: string | null } };
      if (body.run.status === 'done' || body.run.status === 'error') {
        pending.delete(id);
        times.push(Date.parse(body.run.finishedAt!) - Date.parse(body.run.queuedAt));
      }
    }
    if (pending.size > 0) await new Promise((r) => setTimeout(r, 1000));
  }
  return { times: times.sort((a, b) => a - b), unfinished: pending.size };
}

export async function run(): Promise<void> {
  const services = (await import(
    pathToFileURL(path.join(root, 'scripts', 'lib', 'services.mjs')).href
  )) as ServicesModule;
  const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'varigate-bench-'));
  fs.chmodSync(dataDir, 0o755);
  const children: ChildProcess[] = [];
  try {
    const ports = {
      postgres: await services.freePort(),
      s3: await services.freePort(),
      smtp: await services.freePort(),
      mailHttp: await services.freePort(),
    };
    const appPort = await services.freePort();
    const appUrl = `http://127.0.0.1:${appPort}`;
    const { env: serviceEnv } = await services.startAll({ dataDir, ports, fast: false });
    const env: NodeJS.ProcessEnv = {
      ...process.env,
      ...serviceEnv,
      APP_URL: appUrl,
      AUTH_SECRET: 'bench-secret-that-is-long-enough-0123456789',
      NEXT_DIST_DIR: '.next-test',
      NODE_ENV: 'production' as const,
      LOG_LEVEL: 'warn',
      LOG_FORMAT: 'json',
      NEXT_TELEMETRY_DISABLED: '1',
    };
    runCommand(bin('tsx'), ['scripts/migrate.ts'], env);
    if (!fs.existsSync(path.join(root, '.next-test', 'BUILD_ID'))) runCommand(bin('next'), ['build'], env);
    const log = fs.openSync(path.join(dataDir, 'app.log'), 'a');
    children.push(
      spawn(bin('next'), ['start', '-p', String(appPort), '-H', '127.0.0.1'], {
        cwd: root,
        env,
        stdio: ['ignore', log, log],
        detached: true,
      }),
    );
    children.push(
      spawn(bin('tsx'), ['--conditions=react-server', 'scripts/worker.ts'], {
        cwd: root,
        env,
        stdio: ['ignore', log, log],
        detached: true,
      }),
    );
    await waitHttp(`${appUrl}/api/health`);
    const token = await createToken(env);

    const csv = megabyteCsv();
    const body = new Blob([csv], { type: 'text/csv' });
    console.log(
      `${CLIENTS} clients posting ${(csv.length / 1e6).toFixed(2)} MB uploads for ${DURATION_S} s against one app and one worker (${os.cpus().length} cores)`,
    );
    const stats: ClientStats = { latencies: [], failures: new Map(), runIds: [] };
    const until = Date.now() + DURATION_S * 1000;
    await Promise.all(Array.from({ length: CLIENTS }, (_, i) => client(appUrl, token, body, until, i, stats)));
    const sorted = [...stats.latencies].sort((a, b) => a - b);
    const failed = [...stats.failures.values()].reduce((a, b) => a + b, 0);
    console.log(
      `requests: ${stats.latencies.length + failed}, accepted (202): ${stats.runIds.length}, failed: ${failed}${failed ? ` ${JSON.stringify(Object.fromEntries(stats.failures))}` : ''}`,
    );
    console.log(
      `throughput: ${(stats.runIds.length / DURATION_S).toFixed(1)} uploads/s, ${((stats.runIds.length * csv.length) / 1e6 / DURATION_S).toFixed(1)} MB/s`,
    );
    console.log(
      `POST latency ms: p50 ${percentile(sorted, 50).toFixed(0)}, p95 ${percentile(sorted, 95).toFixed(0)}, p99 ${percentile(sorted, 99).toFixed(0)}, max ${sorted.at(-1)?.toFixed(0)}`,
    );
    const drainStarted = Date.now();
    const verdicts = await verdictTimes(appUrl, token, stats.runIds, 30 * 60_000);
    console.log(
      `every accepted upload ended in a verdict: ${verdicts.unfinished === 0 ? 'yes' : `NO, ${verdicts.unfinished} unfinished`} (queue drained ${((Date.now() - drainStarted) / 1000).toFixed(0)} s after the load stopped)`,
    );
    console.log(
      `POST to verdict s: p50 ${(percentile(verdicts.times, 50) / 1000).toFixed(1)}, p95 ${(percentile(verdicts.times, 95) / 1000).toFixed(1)}, max ${((verdicts.times.at(-1) ?? 0) / 1000).toFixed(1)} (one worker; the queue grows while uploads outpace it)`,
    );
  } finally {
    for (const c of children) {
      try {
        process.kill(-c.pid!, 'SIGTERM');
      } catch {
        // gone
      }
    }
    await new Promise((r) => setTimeout(r, 2000));
    await services.stopAll({ dataDir });
    fs.rmSync(dataDir, { recursive: true, force: true });
  }
}
