/**
 * `npm start`: the whole product on this machine, with demo data. Installs dependencies when
 * missing, starts PostgreSQL, the S3 fake and the mail catcher (scripts/lib/services.mjs),
 * applies migrations, seeds the demo workspace, builds, serves http://localhost:3000 and starts
 * the analysis worker. Ctrl-C stops everything it started.
 * `npm run dev` (`--dev`): the same with `next dev` instead of a production build.
 */
import path from 'node:path';
import fs from 'node:fs';
import {
  Children,
  bin,
  checkNode,
  ensureDependencies,
  localAuthSecret,
  root,
  run,
  say,
  waitForHttp,
} from './lib/setup.mjs';
import { devPorts } from './lib/dev-config.mjs';

const dev = process.argv.includes('--dev');
const dataDir = path.join(root, '.data');
const children = new Children();
let startedServices;
let shuttingDown = false;

async function shutdown(code) {
  if (shuttingDown) return;
  shuttingDown = true;
  say('stopping');
  await children.stopAll();
  if (startedServices) {
    const { stopAll } = await import('./lib/services.mjs');
    await stopAll({ dataDir, only: startedServices });
  }
  process.exit(code);
}
process.on('SIGINT', () => void shutdown(0));
process.on('SIGTERM', () => void shutdown(0));

async function main() {
  checkNode();
  ensureDependencies();
  const { startAll } = await import('./lib/services.mjs');
  say('starting services');
  const services = await startAll({ dataDir, ports: devPorts });
  startedServices = services.started;
  const appUrl = process.env.APP_URL ?? `http://localhost:${devPorts.app}`;
  const env = {
    ...services.env,
    APP_URL: appUrl,
    AUTH_URL: appUrl,
    AUTH_SECRET: process.env.AUTH_SECRET ?? localAuthSecret(dataDir),
    NEXT_TELEMETRY_DISABLED: '1',
    NODE_ENV: dev ? 'development' : 'production',
  };
  say('applying migrations');
  run(bin('tsx'), ['scripts/migrate.ts'], env);
  say('seeding demo data');
  run(bin('tsx'), ['--conditions=react-server', 'scripts/seed.ts'], env);
  if (!dev) {
    say('building the web app (next build)');
    run(bin('next'), ['build'], env);
  }
  const logDir = path.join(dataDir, 'logs');
  fs.mkdirSync(logDir, { recursive: true });
  children.spawn('web', bin('next'), [dev ? 'dev' : 'start', '-p', String(devPorts.app), '-H', '127.0.0.1'], env);
  children.spawn('worker', bin('tsx'), ['--conditions=react-server', 'scripts/worker.ts'], {
    ...env,
    VARIGATE_PROCESS: 'worker',
  });
  await waitForHttp(`http://127.0.0.1:${devPorts.app}/api/health`);
  const demo = path.join(dataDir, 'demo-accounts.txt');
  say(
    [
      `Varigate is running at ${appUrl}`,
      fs.existsSync(demo) ? fs.readFileSync(demo, 'utf8').trim() : '',
      `Mail sent by the app: ${appUrl}/dev/mail`,
      'Press Ctrl-C to stop.',
    ]
      .filter(Boolean)
      .join('\n'),
  );
}

main().catch(async (err) => {
  process.stderr.write(`\n[varigate] start failed: ${err.message}\n`);
  await shutdown(1);
});
