/**
 * Overview query at scale: `npm run bench -- overview`.
 *
 * A throwaway PostgreSQL cluster gets one workspace with 3 projects, 10,000 builds, 8 runs per
 * build and 2 findings per failing run (made with generate_series, not through the API, which
 * `npm run bench -- api` measures). Then the overview's page query runs with the filters people
 * use, each timed over repeated calls, with EXPLAIN's plan summary for the default view.
 */
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { pathToFileURL } from 'node:url';

const BUILDS = Number(process.env.VARIGATE_BENCH_BUILDS ?? 10_000);
const RUNS_PER_BUILD = 8;
const REPEAT = 20;
const root = path.resolve(import.meta.dirname, '..', '..');

interface ServicesModule {
  freePort(): Promise<number>;
  startPostgres(o: { dataDir: string; port: number; fast: boolean }): Promise<{ url: string }>;
  stopPostgres(o: { dataDir: string }): void;
}

const SEED = `
insert into workspaces (id, slug, name) values ('00000000-0000-4000-8000-000000000001', 'bench', 'Bench');
insert into projects (id, workspace_id, slug, name)
  select ('00000000-0000-4000-8000-00000000010' || p)::uuid, '00000000-0000-4000-8000-000000000001', 'project-' || p, 'Project ' || p
  from generate_series(1, 3) p;
insert into cases (id, workspace_id, project_id, name)
  select gen_random_uuid(), '00000000-0000-4000-8000-000000000001', ('00000000-0000-4000-8000-00000000010' || p)::uuid, 'case-' || c
  from generate_series(1, 3) p, generate_series(1, ${RUNS_PER_BUILD}) c;
insert into builds (id, workspace_id, project_id, key, commit, branch, verdict, started_at)
  select gen_random_uuid(), '00000000-0000-4000-8000-000000000001', ('00000000-0000-4000-8000-00000000010' || (1 + b % 3))::uuid,
    'nightly-' || b, md5(b::text), case when b % 10 = 0 then 'feature-' || (b % 7) else 'main' end,
    (array['pass','pass','pass','warn','fail','error'])[1 + (b * 7919) % 6]::verdict,
    now() - make_interval(hours => ${BUILDS} - b)
  from generate_series(1, ${BUILDS}) b;
insert into runs (id, workspace_id, project_id, build_id, case_id, status, verdict, created_at)
  select gen_random_uuid(), b.workspace_id, b.project_id, b.id, c.id, 'done',
    case when b.verdict in ('fail', 'error') and c.name in ('case-1', 'case-2') then b.verdict else 'pass' end,
    b.started_at
  from builds b join cases c on c.project_id = b.project_id;
insert into findings (workspace_id, run_id, variable, kind, severity, step, message)
  select r.workspace_id, r.id, 'c', k.kind, 'fail', 10, 'c: ' || k.kind || ' at step 10'
  from runs r, (values ('tv-growth'), ('new-extrema')) k(kind) where r.verdict = 'fail';
analyze;
`;

export async function run(): Promise<void> {
  const services = (await import(
    pathToFileURL(path.join(root, 'scripts', 'lib', 'services.mjs')).href
  )) as ServicesModule;
  const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'varigate-bench-overview-'));
  fs.chmodSync(dataDir, 0o755);
  try {
    const pg = await services.startPostgres({ dataDir, port: await services.freePort(), fast: true });
    // Only the database is used; the other settings are placeholders the env check asks for.
    Object.assign(process.env, {
      DATABASE_URL: pg.url,
      S3_BUCKET: 'unused',
      S3_ACCESS_KEY_ID: 'unused',
      S3_SECRET_ACCESS_KEY: 'unused',
      SMTP_URL: 'smtp://127.0.0.1:9',
    });
    const env = { ...process.env, DATABASE_URL: pg.url };
    const migrated = spawnSync(path.join(root, 'node_modules', '.bin', 'tsx'), ['scripts/migrate.ts'], {
      cwd: root,
      env,
      stdio: 'inherit',
    });
    if (migrated.status !== 0) throw new Error('migrations failed');
    const { getSql, closeDb } = await import('@/db/client');
    const { listOverviewBuilds } = await import('@/src/server/queries/overview');
    const sql = getSql();
    const seeded = performance.now();
    await sql.unsafe(SEED);
    const [counts] = await sql<{ builds: number; runs: number; findings: number }[]>`
      select (select count(*) from builds)::int as builds, (select count(*) from runs)::int as runs, (select count(*) from findings)::int as findings`;
    console.log(
      `seeded ${counts!.builds} builds, ${counts!.runs} runs, ${counts!.findings} findings in ${((performance.now() - seeded) / 1000).toFixed(1)} s`,
    );

    const workspaceId = '00000000-0000-4000-8000-000000000001';
    const base = { workspaceId, verdict: 'problems' as const, sort: 'newest' as const, page: 1, pageSize: 25 };
    const cases: [string, Parameters<typeof listOverviewBuilds>[0]][] = [
      ['default view (fail/warn/error, newest first, page 1)', base],
      ['page 100 of the default view', { ...base, page: 100 }],
      ['one project, branch main', { ...base, project: 'project-2', branch: 'main' }],
      ['all verdicts, oldest first', { ...base, verdict: 'all', sort: 'oldest' }],
      ['last 7 days', { ...base, from: new Date(Date.now() - 7 * 86_400_000) }],
    ];
    for (const [label, filters] of cases) {
      await listOverviewBuilds(filters); // warm the plan cache
      const times: number[] = [];
      for (let i = 0; i < REPEAT; i++) {
        const t = performance.now();
        await listOverviewBuilds(filters);
        times.push(performance.now() - t);
      }
      times.sort((a, b) => a - b);
      console.log(
        `${label}: median ${times[Math.floor(REPEAT / 2)]!.toFixed(1)} ms, max ${times.at(-1)!.toFixed(1)} ms`,
      );
    }
    await closeDb();
  } finally {
    services.stopPostgres({ dataDir });
    fs.rmSync(dataDir, { recursive: true, force: true });
  }
}
