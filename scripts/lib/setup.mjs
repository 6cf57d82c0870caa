/**
 * Steps shared by `npm start` and `npm test`: dependency install, Chromium for browser tests,
 * running a command with a clear failure, and child-process bookkeeping for a clean Ctrl-C.
 * Node built-ins only: this runs before `npm ci` on a fresh machine.
 */
import { execFileSync, spawn, spawnSync } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';

export const root = path.resolve(import.meta.dirname, '..', '..');
const isRoot = typeof process.getuid === 'function' && process.getuid() === 0;

export function say(message) {
  process.stdout.write(`\n[varigate] ${message}\n`);
}

export function checkNode() {
  const [major, minor] = process.versions.node.split('.').map(Number);
  if (major < 20 || (major === 20 && minor < 9)) {
    throw new Error(`Node.js 20.9 or newer is needed; this is ${process.versions.node}`);
  }
}

/** `npm ci` when node_modules is missing or older than the lock file. */
export function ensureDependencies() {
  const lock = path.join(root, 'package-lock.json');
  const marker = path.join(root, 'node_modules', '.package-lock.json');
  const stale = !fs.existsSync(marker) || fs.statSync(marker).mtimeMs < fs.statSync(lock).mtimeMs;
  if (!stale) return;
  say('installing dependencies (npm ci)');
  run('npm', ['ci', '--no-audit', '--no-fund'], {});
}

/** Debian's Chromium for the browser tests, installed with apt-get when missing. */
export function ensureChromium() {
  const candidates = [process.env.CHROMIUM_PATH, '/usr/bin/chromium', '/usr/bin/chromium-browser'].filter(Boolean);
  const found = candidates.find((p) => fs.existsSync(p));
  if (found) return found;
  if (!isRoot) throw new Error('Chromium is needed for the browser tests: sudo apt-get install -y chromium');
  say('installing Debian chromium for the browser tests (apt-get)');
  execFileSync('apt-get', ['update', '-qq'], { stdio: 'inherit' });
  execFileSync('apt-get', ['install', '-y', '-qq', 'chromium'], {
    stdio: 'inherit',
    env: { ...process.env, DEBIAN_FRONTEND: 'noninteractive' },
  });
  return '/usr/bin/chromium';
}

/** Runs a command in the foreground; throws with its name when it fails. */
export function run(cmd, args, env, { allowFailure = false } = {}) {
  const r = spawnSync(cmd, args, { cwd: root, stdio: 'inherit', env: { ...process.env, ...env } });
  if (r.status !== 0 && !allowFailure)
    throw new Error(`${cmd} ${args.join(' ')} failed (exit ${r.status ?? r.signal})`);
  return r.status ?? 1;
}

export const bin = (name) => path.join(root, 'node_modules', '.bin', name);

/** A persistent AUTH_SECRET for local runs, kept under the data folder. */
export function localAuthSecret(dataDir) {
  const file = path.join(dataDir, 'auth-secret');
  if (!fs.existsSync(file)) {
    fs.mkdirSync(dataDir, { recursive: true });
    fs.writeFileSync(file, randomBytes(32).toString('base64url'), { mode: 0o600 });
  }
  return fs.readFileSync(file, 'utf8').trim();
}

/** Long-running children (app, worker) that must end when we do. */
export class Children {
  list = [];
  spawn(name, cmd, args, env, { logFile } = {}) {
    const out = logFile ? fs.openSync(logFile, 'a') : 'inherit';
    const child = spawn(cmd, args, {
      cwd: root,
      env: { ...process.env, ...env },
      stdio: ['ignore', out, out],
      detached: true,
    });
    child.on('exit', (code, signal) => {
      if (!this.stopping) process.stderr.write(`[varigate] ${name} exited (${code ?? signal})\n`);
    });
    this.list.push({ name, child });
    return child;
  }
  async stopAll() {
    this.stopping = true;
    await Promise.all(
      this.list.map(
        ({ child }) =>
          new Promise((resolve) => {
            if (child.exitCode !== null || child.signalCode !== null) return resolve();
            child.once('exit', resolve);
            try {
              process.kill(-child.pid, 'SIGTERM');
            } catch {
              resolve();
            }
            setTimeout(() => {
              try {
                process.kill(-child.pid, 'SIGKILL');
              } catch {
                /* already gone */
              }
              resolve();
            }, 5000).unref();
          }),
      ),
    );
  }
}

/** Polls a URL until it answers 200. */
export async function waitForHttp(url, timeoutMs = 120_000) {
  const deadline = Date.now() + timeoutMs;
  let last = '';
  while (Date.now() < deadline) {
    try {
      const res = await fetch(url, { signal: AbortSignal.timeout(5000) });
      if (res.ok) return;
      last = `HTTP ${res.status}`;
    } catch (err) {
      last = err.message;
    }
    await new Promise((r) => setTimeout(r, 500));
  }
  throw new Error(`${url} did not answer 200 within ${timeoutMs / 1000} s (last: ${last})`);
}
