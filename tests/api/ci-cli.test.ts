import { spawn } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import fs from 'node:fs';
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb } from '@/db/client';
import { ensureProject, ensureWorkspace } from '@/src/server/queries/projects';
import { issueToken } from '@/src/server/services/tokens';
import { appUrl } from '../support/env';

// The CI uploader is run as a real child process, the way a CI job runs it.
const script = path.join(process.cwd(), 'scripts', 'varigate-ci.mjs');
const snapshots = path.join(process.cwd(), 'fixtures', 'snapshots');
const failingFixture = path.join(snapshots, 'tophat-lax-wendroff.csv');
const passingFixture = path.join(snapshots, 'tophat-van-leer.csv');
const corruptFixtures = ['bad-non-numeric.csv', 'not-numeric.csv'].map((f) => path.join(snapshots, f));
const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/;

interface CliCase {
  case: string;
  runId: string | null;
  url: string | null;
  status: string;
  verdict: string | null;
  message: string | null;
  findings: { message: string }[];
  timedOut: boolean;
}
interface CliResult {
  exitCode: number;
  note: string | null;
  cases: CliCase[];
}
interface CliRun {
  code: number | null;
  stdout: string;
  stderr: string;
}

const suffix = randomBytes(4).toString('hex');
const project = 'saltmarsh';
let token = '';
let tmpDir = '';
let corruptFile = '';
let buildCounter = 0;

/** A fresh build key per CLI call, so tests never see each other's runs. */
function newBuild(): string {
  buildCounter += 1;
  return `cli-${suffix}-${buildCounter}`;
}

function runCli(args: string[], env: Record<string, string | undefined> = {}): Promise<CliRun> {
  // No VARIGATE_* from the outer environment: each test says what the CLI gets.
  const childEnv: NodeJS.ProcessEnv = { NODE_ENV: 'test', PATH: process.env.PATH };
  Object.assign(childEnv, env);
  return new Promise((resolve, reject) => {
    const child = spawn(process.execPath, [script, ...args], { cwd: process.cwd(), env: childEnv });
    let stdout = '';
    let stderr = '';
    child.stdout.on('data', (chunk: Buffer) => (stdout += chunk.toString()));
    child.stderr.on('data', (chunk: Buffer) => (stderr += chunk.toString()));
    child.on('error', reject);
    child.on('close', (code) => resolve({ code, stdout, stderr }));
  });
}

/** The usual flags for the real app; `extra` adds or overrides. */
function appArgs(build: string, cases: string[], extra: string[] = []): string[] {
  return [
    '--url',
    appUrl(),
    '--build',
    build,
    '--commit',
    '4be07d1',
    '--branch',
    'main',
    '--project',
    project,
    ...cases.flatMap((c) => ['--case', c]),
    ...extra,
  ];
}

function parseJsonResult(run: CliRun): CliResult {
  try {
    return JSON.parse(run.stdout) as CliResult;
  } catch {
    throw new Error(`the CLI did not print JSON (exit ${run.code}):\n${run.stdout}\n${run.stderr}`);
  }
}

function onlyCase(result: CliResult): CliCase {
  expect(result.cases).toHaveLength(1);
  return result.cases[0]!;
}

function unescapeXml(text: string): string {
  return text
    .replace(/&lt;/g, '<')
    .replace(/&gt;/g, '>')
    .replace(/&quot;/g, '"')
    .replace(/&apos;/g, "'")
    .replace(/&amp;/g, '&');
}

/**
 * Throws unless `xml` is well-formed: one root, tags nested and closed in order, attribute values
 * quoted, no raw `<` in text or attributes and no `&` that is not a known entity.
 */
function assertWellFormedXml(xml: string): void {
  const body = xml.replace(/^<\?xml [^?]*\?>\s*/, '');
  const token = /<(\/?)([A-Za-z_][\w.:-]*)((?:\s+[A-Za-z_][\w.:-]*="[^"<]*")*)\s*(\/?)>|([^<]+)/y;
  const badAmp = /&(?!(?:amp|lt|gt|quot|apos|#\d+|#x[0-9a-fA-F]+);)/;
  const stack: string[] = [];
  let roots = 0;
  let pos = 0;
  while (pos < body.length) {
    token.lastIndex = pos;
    const m = token.exec(body);
    if (!m) throw new Error(`not well-formed XML at offset ${pos}: ${body.slice(pos, pos + 40)}`);
    pos = token.lastIndex;
    const [, closing, name, attrs, selfClosing, text] = m;
    if (text !== undefined) {
      if (badAmp.test(text)) throw new Error(`unescaped & in text: ${text}`);
      if (stack.length === 0 && text.trim() !== '') throw new Error(`text outside the root: ${text}`);
      continue;
    }
    if (attrs && badAmp.test(attrs)) throw new Error(`unescaped & in attributes of <${name}>`);
    if (closing) {
      if (stack.pop() !== name) throw new Error(`</${name}> closes the wrong element`);
    } else {
      if (stack.length === 0) roots += 1;
      if (!selfClosing) stack.push(name!);
    }
  }
  if (stack.length > 0) throw new Error(`unclosed elements: ${stack.join(', ')}`);
  if (roots !== 1) throw new Error(`expected one root element, found ${roots}`);
}

interface JunitCase {
  attrs: Record<string, string>;
  inner: string;
}

function junitCases(xml: string): JunitCase[] {
  return [...xml.matchAll(/<testcase\b([^>]*?)(?:\/>|>([\s\S]*?)<\/testcase>)/g)].map((m) => ({
    attrs: Object.fromEntries([...m[1]!.matchAll(/([\w.-]+)="([^"]*)"/g)].map((a) => [a[1]!, unescapeXml(a[2]!)])),
    inner: m[2] ?? '',
  }));
}

function attrOf(element: string, tag: string, attr: string): string | undefined {
  const m = new RegExp(`<${tag}\\b[^>]*\\s${attr}="([^"]*)"`).exec(element);
  return m ? unescapeXml(m[1]!) : undefined;
}

async function getRun(
  id: string,
): Promise<{ status: number; body: { run: { id: string; case: string; build: { key: string } } } }> {
  const res = await fetch(`${appUrl()}/api/v1/runs/${id}`, { headers: { authorization: `Bearer ${token}` } });
  return {
    status: res.status,
    body: (await res.json()) as { run: { id: string; case: string; build: { key: string } } },
  };
}

beforeAll(async () => {
  const workspace = await ensureWorkspace({ slug: `cli-test-${suffix}`, name: `CLI test ${suffix}` });
  const saltmarsh = await ensureProject({ workspaceId: workspace.id, slug: project, name: 'Saltmarsh' });
  token = (await issueToken({ workspaceId: workspace.id, projectId: saltmarsh.id, name: 'ci-cli test' })).token;
  tmpDir = fs.mkdtempSync(path.join(os.tmpdir(), 'varigate-cli-'));
  corruptFile = corruptFixtures.find((f) => fs.existsSync(f)) ?? path.join(tmpDir, 'bad-non-numeric.csv');
  if (!fs.existsSync(corruptFile)) {
    const rows = ['step,time,x,u'];
    for (let step = 0; step < 3; step++)
      for (let i = 0; i < 20; i++)
        rows.push(`${step},${step * 0.1},${(i + 0.5) / 20},${i === 7 && step === 1 ? '0.4x1' : 0.5}`);
    fs.writeFileSync(corruptFile, `${rows.join('\n')}\n`);
  }
});

afterAll(async () => {
  if (tmpDir) fs.rmSync(tmpDir, { recursive: true, force: true });
  await closeDb();
});

describe('varigate-ci command line', () => {
  it('prints its usage with --help and exits 0', async () => {
    const run = await runCli(['--help']);
    expect(run.code).toBe(0);
    expect(run.stdout).toContain('--case <name>=<file>');
    expect(run.stdout).toContain('--presign-above');
  });

  it('exits 3 naming --build when it is missing, and prints no table', async () => {
    const args = appArgs('unused', [`pc=${passingFixture}`]).filter(
      (a, i, all) => a !== '--build' && all[i - 1] !== '--build',
    );
    const run = await runCli(args, { VARIGATE_TOKEN: token });
    expect(run.code).toBe(3);
    expect(run.stderr).toMatch(/--build is required/);
    expect(run.stdout).toBe('');
  });

  it('exits 3 naming the path when a --case file does not exist', async () => {
    const missing = path.join(tmpDir, 'no-such-snapshot.csv');
    const run = await runCli(appArgs(newBuild(), [`ghost=${missing}`]), { VARIGATE_TOKEN: token });
    expect(run.code).toBe(3);
    expect(run.stderr).toContain(missing);
    expect(run.stderr).toMatch(/no such file/);
  });

  it('exits 3 on a --case without a file, a bad case name or an unknown --format', async () => {
    for (const extra of [
      ['--case', 'lonely'],
      ['--case', `bad name=${passingFixture}`],
      ['--case', `pc=${passingFixture}`, '--format', 'xlsx'],
    ]) {
      const run = await runCli(
        ['--url', appUrl(), '--build', newBuild(), '--commit', 'c', '--branch', 'main', ...extra],
        { VARIGATE_TOKEN: token },
      );
      expect(run.code, `${extra.join(' ')}\n${run.stderr}`).toBe(3);
      expect(run.stderr).toMatch(/--case|--format/);
    }
  });

  it('exits 3 when no token is given by flag or VARIGATE_TOKEN', async () => {
    const run = await runCli(appArgs(newBuild(), [`pc=${passingFixture}`]));
    expect(run.code).toBe(3);
    expect(run.stderr).toMatch(/VARIGATE_TOKEN/);
  });
});

describe('varigate-ci against the running app', () => {
  it('turns an API refusal (token of another project) into an error row with the API message, exit 2', async () => {
    const args = appArgs(
      newBuild(),
      [`pc=${passingFixture}`],
      ['--project', `other-${suffix}`, '--json', '--timeout', '30'],
    );
    const run = await runCli(args, { VARIGATE_TOKEN: token });
    const row = onlyCase(parseJsonResult(run));
    expect(run.code).toBe(2);
    expect(row.verdict).toBe('error');
    expect(row.timedOut).toBe(false);
    expect(row.message).toContain(`belongs to project "${project}"`);
    // Refusals are not retried: the same request would be refused again.
    expect(run.stderr).not.toMatch(/retrying/);
  });

  it('reports a CSV with a non-numeric cell as an error row naming the cell, exit 2', { timeout: 90_000 }, async () => {
    const run = await runCli(appArgs(newBuild(), [`damaged=${corruptFile}`], ['--json', '--timeout', '60']), {
      VARIGATE_TOKEN: token,
    });
    const row = onlyCase(parseJsonResult(run));
    expect(run.code).toBe(2);
    expect(row.verdict).toBe('error');
    // An analysed error, not a timeout: the message comes from reading the file.
    expect(row.timedOut, row.message ?? '').toBe(false);
    expect(row.message).toMatch(/not a number/i);
  });

  it.skipIf(!fs.existsSync(failingFixture))(
    'exits 1 with a fail row for the Lax-Wendroff top hat',
    { timeout: 90_000 },
    async () => {
      const run = await runCli(appArgs(newBuild(), [`tophat-lw=${failingFixture}`], ['--json', '--timeout', '60']), {
        VARIGATE_TOKEN: token,
      });
      const result = parseJsonResult(run);
      const row = onlyCase(result);
      expect(row.verdict, row.message ?? '').toBe('fail');
      expect(run.code).toBe(1);
      expect(row.findings.length).toBeGreaterThan(0);
      expect(row.message).toBe(row.findings[0]!.message);
      expect(result.note).toMatch(/does not validate/);
    },
  );

  it.skipIf(!fs.existsSync(passingFixture))(
    'exits 0 and prints a pass row for the van Leer top hat',
    { timeout: 90_000 },
    async () => {
      const run = await runCli(appArgs(newBuild(), [`tophat-vl=${passingFixture}`], ['--timeout', '60']), {
        VARIGATE_TOKEN: token,
      });
      expect(run.code, run.stdout + run.stderr).toBe(0);
      const row = run.stdout.split('\n').find((l) => l.startsWith('tophat-vl '));
      expect(row).toMatch(/^tophat-vl\s+pass\s/);
      expect(run.stdout).toMatch(/does not validate/);
    },
  );

  it(
    'writes a well-formed JUnit file with one testcase per case matching the verdicts',
    { timeout: 60_000 },
    async () => {
      const junit = path.join(tmpDir, `junit-${buildCounter}.xml`);
      const args = appArgs(
        newBuild(),
        [`vl=${passingFixture}`, `damaged=${corruptFile}`],
        ['--json', '--timeout', '4', '--junit', junit],
      );
      const run = await runCli(args, { VARIGATE_TOKEN: token });
      const result = parseJsonResult(run);
      const xml = fs.readFileSync(junit, 'utf8');
      assertWellFormedXml(xml);
      const cases = junitCases(xml);
      expect(cases.map((c) => c.attrs.name)).toEqual(['vl', 'damaged']);
      for (const [i, c] of cases.entries()) {
        const verdict = result.cases[i]!.verdict;
        expect(c.attrs.classname).toBe(project);
        expect(c.inner.includes('<error '), `${c.attrs.name}: ${verdict}`).toBe(verdict === 'error');
        expect(c.inner.includes('<failure '), `${c.attrs.name}: ${verdict}`).toBe(verdict === 'fail');
      }
      // The damaged file can never pass: as an analysed error or, before a verdict, a timeout.
      expect(cases[1]!.inner).toContain('<error ');
      expect(run.code).toBe(2);
      expect(attrOf(xml, 'testsuite', 'tests')).toBe('2');
      expect(attrOf(xml, 'testsuite', 'name')).toBe('varigate');
    },
  );

  it('uploads through a presigned URL above --presign-above, reporting bytes sent', async () => {
    const build = newBuild();
    const run = await runCli(
      appArgs(build, [`vl-big=${passingFixture}`], ['--presign-above', '1', '--json', '--timeout', '4']),
      { VARIGATE_TOKEN: token },
    );
    const row = onlyCase(parseJsonResult(run));
    expect(row.runId, run.stderr).toMatch(UUID);
    const size = fs.statSync(passingFixture).size;
    expect(run.stderr).toMatch(/vl-big \(presigned upload\): .* \(100%\)/);
    expect(run.stderr).toContain(`via presigned URL`);
    expect(size).toBeGreaterThan(1);
    const stored = await getRun(row.runId!);
    expect(stored.status).toBe(200);
    expect(stored.body.run.case).toBe('vl-big');
    expect(stored.body.run.build.key).toBe(build);
  });

  it('gives the same run id when the same build, case and file are uploaded again, and a new one for another file', async () => {
    const build = newBuild();
    const once = async (file: string) =>
      onlyCase(
        parseJsonResult(
          await runCli(appArgs(build, [`repeat=${file}`], ['--json', '--timeout', '2']), { VARIGATE_TOKEN: token }),
        ),
      );
    const first = await once(passingFixture);
    const second = await once(passingFixture);
    expect(first.runId).toMatch(UUID);
    expect(second.runId).toBe(first.runId);
    const other = await once(failingFixture);
    expect(other.runId).toMatch(UUID);
    expect(other.runId).not.toBe(first.runId);
  });

  it('gives the same run id when a presigned upload is repeated by a re-run CI job', async () => {
    const build = newBuild();
    const args = appArgs(build, [`repeat-big=${passingFixture}`], ['--presign-above', '1', '--json', '--timeout', '3']);
    const first = onlyCase(parseJsonResult(await runCli(args, { VARIGATE_TOKEN: token })));
    const again = await runCli(args, { VARIGATE_TOKEN: token });
    const second = onlyCase(parseJsonResult(again));
    expect(first.runId).toMatch(UUID);
    expect(second.runId, again.stderr).toBe(first.runId);
  });
});

// ---------------------------------------------------------------------------------------------
// Behaviour that the real app cannot be made to show on demand (transient 503s, every verdict at
// once), checked against a small stand-in that speaks the same API.

interface FakeRequest {
  method: string;
  url: string;
  headers: http.IncomingHttpHeaders;
  body: string;
}
type FakeAnswer = { status: number; body: unknown; headers?: Record<string, string> };

async function startFakeApi(
  answer: (req: FakeRequest, seen: FakeRequest[]) => FakeAnswer,
): Promise<{ url: string; requests: FakeRequest[]; close: () => Promise<void> }> {
  const requests: FakeRequest[] = [];
  const server = http.createServer((req, res) => {
    const chunks: Buffer[] = [];
    req.on('data', (c: Buffer) => chunks.push(c));
    req.on('end', () => {
      const seen: FakeRequest = {
        method: req.method ?? '',
        url: req.url ?? '',
        headers: req.headers,
        body: Buffer.concat(chunks).toString('utf8'),
      };
      requests.push(seen);
      const a = answer(seen, requests);
      res.writeHead(a.status, { 'content-type': 'application/json', ...a.headers });
      res.end(JSON.stringify(a.body));
    });
  });
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  const { port } = server.address() as AddressInfo;
  return {
    url: `http://127.0.0.1:${port}`,
    requests,
    close: () => new Promise((resolve) => server.close(() => resolve())),
  };
}

function caseOfMultipart(body: string): string {
  return /name="case"\r\n\r\n([^\r]*)\r\n/.exec(body)?.[1] ?? '';
}

const TRICKY = `TV grew by 3.1e-2 where x < 0.5 & "front" isn't sharp`;
const NOTE = 'These checks look for spurious oscillation. A pass does not validate the physics.';

/** A stand-in whose runs finish at once with the verdict named by the case (pass-1, fail-x...). */
function verdictServer(): Promise<{ url: string; requests: FakeRequest[]; close: () => Promise<void> }> {
  return startFakeApi((req) => {
    if (req.method === 'POST' && req.url === '/api/v1/runs') {
      const name = caseOfMultipart(req.body);
      return {
        status: 202,
        body: { run: { id: `run-${name}`, status: 'queued', url: `http://varigate.test/runs/${name}` } },
      };
    }
    const name = /^\/api\/v1\/runs\/run-(.+)$/.exec(req.url)?.[1] ?? '';
    const verdict = name.split('-')[0]!;
    const findings =
      verdict === 'fail' || verdict === 'warn'
        ? [{ variable: 'u', kind: 'tv-growth', severity: verdict, step: 3, message: TRICKY }]
        : [];
    const status = verdict === 'error' ? 'error' : 'done';
    const errorMessage = verdict === 'error' ? 'Line 58, column 4 ("u"): "0.98x3" is not a number' : null;
    return {
      status: 200,
      body: {
        run: { id: `run-${name}`, status, verdict, errorMessage, url: `http://varigate.test/runs/${name}` },
        findings,
        note: NOTE,
      },
    };
  });
}

function fakeArgs(url: string, cases: string[], extra: string[] = []): string[] {
  return [
    '--url',
    url,
    '--token',
    'vgt_fake',
    '--build',
    'b1',
    '--commit',
    'c1',
    '--branch',
    'main',
    ...cases.flatMap((c) => ['--case', `${c}=${passingFixture}`]),
    ...extra,
  ];
}

describe('varigate-ci verdicts, reports and retries (stand-in API)', () => {
  it.each([
    { cases: ['pass-a', 'warn-b'], code: 0, label: 'pass + warn -> exit 0' },
    { cases: ['pass-a', 'fail-b'], code: 1, label: 'pass + fail -> exit 1' },
    { cases: ['fail-a', 'error-b'], code: 2, label: 'fail + error -> exit 2 (an error outranks a fail)' },
  ])('maps verdicts to the exit code: $label', async ({ cases, code }) => {
    const fake = await verdictServer();
    try {
      const run = await runCli(fakeArgs(fake.url, cases, ['--quiet']));
      expect(run.code, run.stderr).toBe(code);
      for (const name of cases) expect(run.stdout).toMatch(new RegExp(`^${name}\\s+${name.split('-')[0]}\\s`, 'm'));
      expect(run.stdout).toContain(NOTE);
    } finally {
      await fake.close();
    }
  });

  it('maps fail to <failure>, error to <error> and warn to <system-out> in JUnit, escaping the messages', async () => {
    const fake = await verdictServer();
    const junit = path.join(tmpDir, 'junit-fake.xml');
    try {
      const run = await runCli(
        fakeArgs(fake.url, ['pass-a', 'warn-b', 'fail-c', 'error-d'], ['--junit', junit, '--quiet']),
      );
      expect(run.code).toBe(2);
      const xml = fs.readFileSync(junit, 'utf8');
      assertWellFormedXml(xml);
      expect(attrOf(xml, 'testsuite', 'tests')).toBe('4');
      expect(attrOf(xml, 'testsuite', 'failures')).toBe('1');
      expect(attrOf(xml, 'testsuite', 'errors')).toBe('1');
      const [pass, warn, fail, error] = junitCases(xml);
      expect(pass!.attrs.classname).toBe('varigate');
      expect(pass!.inner.trim()).toBe('');
      expect(warn!.inner).toContain('<system-out>');
      expect(unescapeXml(warn!.inner)).toContain(TRICKY);
      expect(warn!.inner).not.toMatch(/<failure|<error/);
      expect(attrOf(fail!.inner, 'failure', 'message')).toBe(TRICKY);
      expect(attrOf(error!.inner, 'error', 'message')).toBe('Line 58, column 4 ("u"): "0.98x3" is not a number');
    } finally {
      await fake.close();
    }
  });

  it('retries a 503 with the same Idempotency-Key, honouring Retry-After', async () => {
    const fake = await startFakeApi((req, seen) => {
      if (req.method === 'POST') {
        const posts = seen.filter((r) => r.method === 'POST').length;
        if (posts === 1)
          return {
            status: 503,
            headers: { 'retry-after': '0' },
            body: { error: { code: 'unavailable:storage', message: 'storage is busy' } },
          };
        return { status: 202, body: { run: { id: 'run-1', status: 'queued', url: 'http://varigate.test/runs/1' } } };
      }
      return {
        status: 200,
        body: { run: { id: 'run-1', status: 'done', verdict: 'pass', errorMessage: null }, findings: [], note: NOTE },
      };
    });
    try {
      const started = Date.now();
      const run = await runCli(fakeArgs(fake.url, ['pass-a']));
      expect(run.code, run.stderr).toBe(0);
      const posts = fake.requests.filter((r) => r.method === 'POST');
      expect(posts).toHaveLength(2);
      const keys = posts.map((r) => r.headers['idempotency-key']);
      expect(keys[0]).toMatch(/^\S{16,200}$/);
      expect(keys[1]).toBe(keys[0]);
      expect(run.stderr).toMatch(/storage is busy.*retrying in 0 s/);
      // Retry-After: 0 replaces the 1 s backoff.
      expect(Date.now() - started).toBeLessThan(5_000);
    } finally {
      await fake.close();
    }
  });

  it('does not retry a 400 and prints the API message as the case error', async () => {
    const fake = await startFakeApi(() => ({
      status: 400,
      body: { error: { code: 'invalid:run', message: 'commit: the commit is required' } },
    }));
    try {
      const run = await runCli(fakeArgs(fake.url, ['pass-a'], ['--json']));
      const row = onlyCase(parseJsonResult(run));
      expect(run.code).toBe(2);
      expect(fake.requests).toHaveLength(1);
      expect(row.verdict).toBe('error');
      expect(row.message).toBe('commit: the commit is required');
      expect(run.stderr).toContain('commit: the commit is required');
    } finally {
      await fake.close();
    }
  });
});
