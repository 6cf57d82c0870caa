/**
 * `npm test`: every check, against throwaway services. A private PostgreSQL cluster (fsync off),
 * S3 and mail folders in a fresh temp directory on free ports; lint, typecheck, a production
 * build served on a free port with a worker, then vitest's unit, reference, API and browser
 * tests. Stops everything it started and exits non-zero on any failure.
 *
 * While iterating locally: `--skip-build` reuses the last test build (.next-test), `--skip-checks`
 * skips lint and typecheck; other arguments go to vitest (`npm test -- --skip-build tests/api`).
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import {
  Children,
  bin,
  checkNode,
  ensureChromium,
  ensureDependencies,
  root,
  run,
  say,
  waitForHttp,
} from './lib/setup.mjs';

const ownFlags = ['--skip-build', '--skip-checks'];
const skipBuild = process.argv.includes('--skip-build');
const skipChecks = process.argv.includes('--skip-checks');
const vitestArgs = process.argv.slice(2).filter((a) => !ownFlags.includes(a));
// Several people (or agents) iterating on one checkout each keep their own test build.
const distDir = process.env.VARIGATE_TEST_DIST_DIR ?? '.next-test';
const children = new Children();
let tmpDir;
let stopServices;

async function cleanup() {
  await children.stopAll();
  if (stopServices) await stopServices().catch((err) => say(`could not stop services: ${err.message}`));
  if (tmpDir) fs.rmSync(tmpDir, { recursive: true, force: true });
}
process.on('SIGINT', () => void cleanup().then(() => process.exit(130)));

/** Reads vitest's JSON report and prints the plain `N passed, N failed` closing line. */
function printSummary(reportFile) {
  if (!fs.existsSync(reportFile)) return;
  const report = JSON.parse(fs.readFileSync(reportFile, 'utf8'));
  const skipped = (report.numPendingTests ?? 0) + (report.numTodoTests ?? 0);
  // A file that fails before its tests run (import error, failing beforeAll) has no failed test
  // of its own: count it as one failure so the closing line never looks green when it is not.
  const brokenFiles = (report.testResults ?? []).filter(
    (f) => f.status === 'failed' && !(f.assertionResults ?? []).some((a) => a.status === 'failed'),
  ).length;
  const failed = report.numFailedTests + brokenFiles;
  console.log(`\n${report.numPassedTests} passed, ${failed} failed${skipped ? `, ${skipped} skipped` : ''}`);
}

async function main() {
  checkNode();
  ensureDependencies();
  const chromium = ensureChromium();
  const { freePort, startAll, stopAll } = await import('./lib/services.mjs');

  tmpDir = fs.mkdtempSync(path.join(os.tmpdir(), 'varigate-test-'));
  fs.chmodSync(tmpDir, 0o755); // the postgres system user must reach the cluster folder
  const ports = {
    postgres: await freePort(),
    s3: await freePort(),
    smtp: await freePort(),
    mailHttp: await freePort(),
  };
  const appPort = await freePort();
  say(`throwaway services in ${tmpDir}`);
  const services = await startAll({ dataDir: tmpDir, ports, fast: true });
  stopServices = () => stopAll({ dataDir: tmpDir });

  const appUrl = `http://127.0.0.1:${appPort}`;
  const env = {
    ...services.env,
    APP_URL: appUrl,
    AUTH_URL: appUrl,
    AUTH_SECRET: 'test-secret-that-is-long-enough-0123456789',
    NEXT_TELEMETRY_DISABLED: '1',
    NEXT_DIST_DIR: distDir,
    LOG_LEVEL: 'warn',
    LOG_FORMAT: 'json',
    VARIGATE_JOB_LEASE_SECONDS: '6',
    VARIGATE_TEST_DATA_DIR: tmpDir,
    VARIGATE_TEST_PG_PORT: String(ports.postgres),
    CHROMIUM_PATH: chromium,
  };

  if (!skipChecks) {
    say('lint');
    run(bin('eslint'), ['.', '--max-warnings=0'], env);
    run(bin('prettier'), ['--check', '--log-level=warn', '.'], env);
    say('typecheck');
    run(bin('tsc'), ['--noEmit'], env);
  }
  say('migrations');
  run(bin('tsx'), ['scripts/migrate.ts'], env);
  if (!skipBuild || !fs.existsSync(path.join(root, distDir, 'BUILD_ID'))) {
    say('production build (next build)');
    run(bin('next'), ['build'], { ...env, NODE_ENV: 'production' });
  }
  const logDir = path.join(tmpDir, 'logs');
  fs.mkdirSync(logDir, { recursive: true });
  children.spawn(
    'web',
    bin('next'),
    ['start', '-p', String(appPort), '-H', '127.0.0.1'],
    { ...env, NODE_ENV: 'production' },
    {
      logFile: path.join(logDir, 'web.log'),
    },
  );
  const worker = children.spawn(
    'worker',
    bin('tsx'),
    ['--conditions=react-server', 'scripts/worker.ts'],
    { ...env, NODE_ENV: 'production', VARIGATE_PROCESS: 'worker' },
    {
      logFile: path.join(logDir, 'worker.log'),
    },
  );
  // The worker-failure test pauses this worker while it kills workers of its own.
  const workerPidFile = path.join(tmpDir, 'run', 'worker.pid');
  fs.mkdirSync(path.dirname(workerPidFile), { recursive: true });
  fs.writeFileSync(workerPidFile, String(worker.pid));
  env.VARIGATE_TEST_WORKER_PID_FILE = workerPidFile;
  await waitForHttp(`${appUrl}/api/health`);

  say('vitest: unit, reference, api and browser tests');
  const reportFile = path.join(tmpDir, 'vitest-report.json');
  const status = run(
    bin('vitest'),
    ['run', '--reporter=default', '--reporter=json', `--outputFile.json=${reportFile}`, ...vitestArgs],
    { ...env, NODE_ENV: 'test' },
    { allowFailure: true },
  );
  printSummary(reportFile);
  if (status !== 0) {
    for (const f of ['web.log', 'worker.log']) {
      const file = path.join(logDir, f);
      if (fs.existsSync(file))
        process.stdout.write(`\n--- last lines of ${f} ---\n${fs.readFileSync(file, 'utf8').slice(-4000)}\n`);
    }
  }
  return status;
}

main()
  .then(async (status) => {
    await cleanup();
    process.exit(status);
  })
  .catch(async (err) => {
    process.stderr.write(`\n[varigate] test run failed: ${err.message}\n`);
    await cleanup();
    process.exit(1);
  });
