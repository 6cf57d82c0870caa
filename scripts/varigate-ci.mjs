#!/usr/bin/env node
/**
 * varigate-ci: posts a CI build's regression cases to Varigate, waits for the verdicts, prints
 * them and exits non-zero when the gate says no. Node >= 20, built-ins only, so a CI job can
 * download or vendor this one file.
 *
 *   node varigate-ci.mjs --url https://varigate.example --build nightly-412 --commit 9c1e2f0 \
 *     --branch main --case estuary-salt-front=out/salt.h5 --case tophat=out/tophat.csv \
 *     [--project tidewater] [--ci-url <build page>] [--manifest manifest.json] [--format hdf5] \
 *     [--timeout 900] [--junit varigate.xml] [--presign-above 64MiB] [--json] [--quiet]
 *
 * The token comes from --token or, better (flags show up in process listings), VARIGATE_TOKEN;
 * the URL from --url or VARIGATE_URL. See "CI uploader" in docs/api.md.
 *
 * Exit codes: 0 every case pass or warn; 1 some case fail; 2 some case could not be judged
 * (error verdict, rejected upload, no verdict before --timeout), which wins over 1 because a
 * missing judgement must not look like a known failure; 3 usage error (bad flags, unreadable file).
 */
import { createHash } from 'node:crypto';
import fs from 'node:fs';
import { writeFile } from 'node:fs/promises';
import path from 'node:path';
import { parseArgs } from 'node:util';

const EXIT = { ok: 0, fail: 1, error: 2, usage: 3 };
const FORMATS = ['csv', 'csv-long', 'csv-wide', 'hdf5', 'netcdf'];
// Same rule as the API's case names, checked here so a typo fails before any upload.
const CASE_NAME = /^[A-Za-z0-9][A-Za-z0-9._-]{0,99}$/;
const RETRY_DELAYS_S = [1, 2, 4, 8, 16];
const MAX_RETRY_AFTER_S = 120;
const POLL_FIRST_S = 1;
const POLL_MAX_S = 10;
const TABLE_MESSAGE_WIDTH = 100;

const USAGE = `Usage: node varigate-ci.mjs --url <app url> --build <key> --commit <sha> --branch <name>
         --case <name>=<file> [--case <name>=<file> ...] [options]

Posts each case's snapshot file to Varigate, waits for the verdicts and prints them.

Required:
  --url <url>              Varigate's address (or env VARIGATE_URL)
  --token <token>          project CI token (or env VARIGATE_TOKEN, preferred)
  --build <key>            the CI's build id; the same key groups all cases of one build
  --commit <sha>           commit the build ran on
  --branch <name>          branch of the build
  --case <name>=<file>     a regression case and its snapshot file (CSV, .csv.gz, HDF5, NetCDF-4);
                           repeat for each case

Options:
  --project <slug>         project slug (must be the token's project)
  --ci-url <url>           link back to this CI build
  --manifest <file.json>   how to read the files and per-variable options (docs/formats.md)
  --format <fmt>           csv, csv-long, csv-wide, hdf5 or netcdf (default: detected)
  --timeout <seconds>      overall limit for uploading and waiting (default 900)
  --junit <out.xml>        also write a JUnit XML report
  --presign-above <size>   upload larger files through a presigned URL (default 64MiB;
                           bytes, or with a K, M or G suffix meaning KiB, MiB, GiB)
  --json                   print a machine-readable result on stdout instead of the table
  --quiet                  no progress on stderr (errors are still printed)
  --help                   show this help

Exit codes: 0 all pass or warn, 1 any fail, 2 any error or timeout (wins over fail),
            3 usage error.`;

/** A problem with the command line or the local files: exit 3 before anything is sent. */
class UsageError extends Error {}

/** An answer from the API that retrying will not change (4xx other than 429). */
class ApiError extends Error {
  constructor(status, code, message) {
    super(message);
    this.status = status;
    this.code = code;
  }
}

/** The overall --timeout ran out. */
class DeadlineError extends Error {}

// ---------------------------------------------------------------------------------------------
// Command line

const OPTIONS = {
  url: { type: 'string' },
  token: { type: 'string' },
  build: { type: 'string' },
  commit: { type: 'string' },
  branch: { type: 'string' },
  project: { type: 'string' },
  'ci-url': { type: 'string' },
  manifest: { type: 'string' },
  format: { type: 'string' },
  case: { type: 'string', multiple: true },
  timeout: { type: 'string', default: '900' },
  junit: { type: 'string' },
  'presign-above': { type: 'string', default: '64MiB' },
  json: { type: 'boolean', default: false },
  quiet: { type: 'boolean', default: false },
  help: { type: 'boolean', default: false },
};

function readFlags(argv) {
  try {
    return parseArgs({ args: argv, options: OPTIONS, strict: true, allowPositionals: false }).values;
  } catch (err) {
    // parseArgs explains unknown flags and missing values well; keep its words.
    throw new UsageError(err.message);
  }
}

function requireText(value, flag, envName) {
  const text = value?.trim();
  if (!text) throw new UsageError(`${flag} is required${envName ? ` (or set ${envName})` : ''}.`);
  return text;
}

function parseBaseUrl(raw) {
  let url;
  try {
    url = new URL(raw);
  } catch {
    throw new UsageError(`--url: "${raw}" is not a URL.`);
  }
  if (url.protocol !== 'http:' && url.protocol !== 'https:')
    throw new UsageError(`--url: use http or https, not ${url.protocol}`);
  // Keep a path prefix: Varigate may live under one behind a proxy.
  return url.href.replace(/\/+$/, '');
}

function parsePositiveSeconds(raw, flag) {
  const seconds = Number(raw);
  if (!Number.isFinite(seconds) || seconds <= 0)
    throw new UsageError(`${flag}: "${raw}" is not a positive number of seconds.`);
  return seconds;
}

function parseByteSize(raw, flag) {
  const match = /^(\d+)\s*(?:([KMG])(?:i?B)?|B)?$/i.exec(raw.trim());
  if (!match) throw new UsageError(`${flag}: "${raw}" is not a size (e.g. 1048576, 512K, 64MiB, 2G).`);
  const power = { K: 1, M: 2, G: 3 }[match[2]?.toUpperCase() ?? ''] ?? 0;
  return Number(match[1]) * 1024 ** power;
}

/** A readable, regular file, or a usage error naming the flag and the path. */
function checkReadableFile(file, what) {
  let stats;
  try {
    stats = fs.statSync(file);
    fs.accessSync(file, fs.constants.R_OK);
  } catch (err) {
    const reason = err.code === 'ENOENT' ? 'no such file' : err.code === 'EACCES' ? 'permission denied' : err.message;
    throw new UsageError(`${what}: cannot read "${file}": ${reason}.`);
  }
  if (!stats.isFile()) throw new UsageError(`${what}: "${file}" is not a regular file.`);
  return stats.size;
}

function parseCases(values) {
  if (!values || values.length === 0) throw new UsageError('--case <name>=<file> is required (at least one).');
  const seen = new Set();
  return values.map((spec) => {
    const eq = spec.indexOf('=');
    if (eq <= 0 || eq === spec.length - 1) throw new UsageError(`--case "${spec}": write it as <name>=<file>.`);
    const name = spec.slice(0, eq).trim();
    const file = spec.slice(eq + 1);
    if (!CASE_NAME.test(name)) {
      throw new UsageError(
        `--case "${name}": use letters, digits, dot, dash or underscore (at most 100), starting with a letter or digit.`,
      );
    }
    if (seen.has(name)) throw new UsageError(`--case "${name}" is given twice.`);
    seen.add(name);
    const size = checkReadableFile(file, `--case ${name}`);
    return { name, file, size };
  });
}

function readManifest(file) {
  if (file === undefined) return undefined;
  checkReadableFile(file, '--manifest');
  let manifest;
  try {
    manifest = JSON.parse(fs.readFileSync(file, 'utf8'));
  } catch (err) {
    throw new UsageError(`--manifest: "${file}" is not valid JSON (${err.message}).`);
  }
  if (typeof manifest !== 'object' || manifest === null || Array.isArray(manifest)) {
    throw new UsageError(`--manifest: "${file}" must hold a JSON object.`);
  }
  return manifest;
}

function parseOptionalUrl(raw, flag) {
  if (raw === undefined) return undefined;
  try {
    return new URL(raw).href;
  } catch {
    throw new UsageError(`${flag}: "${raw}" is not a URL.`);
  }
}

/** Everything the run needs, validated, or a UsageError saying what to fix. */
function parseConfig(argv, env) {
  const flags = readFlags(argv);
  if (flags.help) return { help: true };
  if (flags.format !== undefined && !FORMATS.includes(flags.format)) {
    throw new UsageError(`--format: "${flags.format}" is not one of ${FORMATS.join(', ')}.`);
  }
  return {
    help: false,
    baseUrl: parseBaseUrl(requireText(flags.url ?? env.VARIGATE_URL, '--url', 'VARIGATE_URL')),
    token: requireText(flags.token ?? env.VARIGATE_TOKEN, '--token', 'VARIGATE_TOKEN'),
    build: requireText(flags.build, '--build'),
    commit: requireText(flags.commit, '--commit'),
    branch: requireText(flags.branch, '--branch'),
    project: flags.project?.trim() || undefined,
    ciUrl: parseOptionalUrl(flags['ci-url'], '--ci-url'),
    format: flags.format,
    manifest: readManifest(flags.manifest),
    cases: parseCases(flags.case),
    timeoutS: parsePositiveSeconds(flags.timeout, '--timeout'),
    junit: flags.junit,
    presignAbove: parseByteSize(flags['presign-above'], '--presign-above'),
    json: flags.json,
    quiet: flags.quiet,
  };
}

// ---------------------------------------------------------------------------------------------
// Output helpers

function makeLogger(quiet) {
  return {
    info: (msg) => {
      if (!quiet) process.stderr.write(`varigate-ci: ${msg}\n`);
    },
    warn: (msg) => process.stderr.write(`varigate-ci: ${msg}\n`),
  };
}

function formatBytes(bytes) {
  const units = ['B', 'KiB', 'MiB', 'GiB', 'TiB'];
  let value = bytes;
  let unit = 0;
  while (value >= 1024 && unit < units.length - 1) {
    value /= 1024;
    unit++;
  }
  return unit === 0 ? `${bytes} B` : `${value.toFixed(1)} ${units[unit]}`;
}

/**
 * Reports bytes sent at every tenth of the file. CI logs are not terminals, so a line per step
 * reads better there than a carriage-return progress bar.
 */
function makeProgress(log, label, total) {
  let nextTenth = 1;
  return (sent) => {
    const tenths = total === 0 ? 10 : Math.floor((sent * 10) / total);
    if (tenths < nextTenth) return;
    nextTenth = tenths + 1;
    log.info(
      `${label}: ${formatBytes(sent)} / ${formatBytes(total)} (${Math.round((sent * 100) / Math.max(total, 1))}%)`,
    );
  };
}

// ---------------------------------------------------------------------------------------------
// HTTP with retries

const sleep = (ms) => new Promise((resolve) => setTimeout(resolve, ms));

/** Seconds to wait from a Retry-After header (delta-seconds or an HTTP date), if usable. */
function retryAfterSeconds(header) {
  if (!header) return undefined;
  const seconds = Number(header);
  if (Number.isFinite(seconds) && seconds >= 0) return Math.min(seconds, MAX_RETRY_AFTER_S);
  const date = Date.parse(header);
  if (Number.isNaN(date)) return undefined;
  return Math.min(Math.max(0, (date - Date.now()) / 1000), MAX_RETRY_AFTER_S);
}

function isRetryableStatus(status) {
  return status === 429 || status >= 500;
}

/** The API's error message when the body has the documented shape, else the HTTP status line. */
async function describeErrorResponse(response) {
  const text = await response.text().catch(() => '');
  try {
    const body = JSON.parse(text);
    if (body?.error?.message)
      return { code: body.error.code ?? `http:${response.status}`, message: body.error.message };
  } catch {
    // not JSON: a proxy's page or S3's XML
  }
  const s3Code = /<Code>([^<]+)<\/Code>/.exec(text)?.[1];
  const detail = s3Code ? ` (${s3Code})` : '';
  return { code: `http:${response.status}`, message: `HTTP ${response.status} ${response.statusText}${detail}` };
}

/**
 * Sends a request, retrying network errors, 429 and 5xx after 1, 2, 4, 8 and 16 s (or the
 * server's Retry-After). `makeInit` is called per attempt because a streamed body can only be
 * sent once. Other 4xx are thrown as ApiError at once: the same request would get the same answer.
 * Nothing waits past the deadline.
 */
async function fetchWithRetry(ctx, label, url, makeInit) {
  for (let attempt = 0; ; attempt++) {
    const remainingMs = ctx.deadline - Date.now();
    if (remainingMs <= 0) throw new DeadlineError(`timed out after ${ctx.timeoutS} s during ${label}`);
    let failure;
    let waitS = RETRY_DELAYS_S[attempt];
    try {
      const response = await fetch(url, { ...makeInit(), signal: AbortSignal.timeout(remainingMs) });
      if (response.ok) return response;
      const { code, message } = await describeErrorResponse(response);
      if (!isRetryableStatus(response.status)) throw new ApiError(response.status, code, message);
      failure = `${message} [${code}]`;
      waitS = retryAfterSeconds(response.headers.get('retry-after')) ?? waitS;
    } catch (err) {
      if (err instanceof ApiError) throw err;
      if (err?.name === 'TimeoutError') throw new DeadlineError(`timed out after ${ctx.timeoutS} s during ${label}`);
      failure = networkErrorMessage(err);
    }
    if (waitS === undefined || attempt >= RETRY_DELAYS_S.length) {
      throw new ApiError(0, 'retries:exhausted', `${label} failed ${attempt + 1} times; last: ${failure}`);
    }
    if (Date.now() + waitS * 1000 >= ctx.deadline)
      throw new DeadlineError(`timed out after ${ctx.timeoutS} s during ${label} (last: ${failure})`);
    ctx.log.warn(`${label}: ${failure}; retrying in ${waitS} s`);
    await sleep(waitS * 1000);
  }
}

/** fetch hides the useful part (ECONNREFUSED, ENOTFOUND...) in `cause`. */
function networkErrorMessage(err) {
  const cause = err?.cause;
  const detail = cause?.code ?? cause?.message;
  return detail ? `${err.message} (${detail})` : String(err?.message ?? err);
}

function authHeaders(ctx, extra = {}) {
  return { authorization: `Bearer ${ctx.token}`, accept: 'application/json', 'user-agent': 'varigate-ci/1', ...extra };
}

// ---------------------------------------------------------------------------------------------
// Upload

async function sha256OfFile(file) {
  const hash = createHash('sha256');
  for await (const chunk of fs.createReadStream(file, { highWaterMark: 1 << 20 })) hash.update(chunk);
  return hash.digest('hex');
}

/**
 * The Idempotency-Key of one upload. It depends only on what the upload means (build, case, the
 * file's content, and the format and manifest that say how to read it), so a retried request or a
 * re-run CI job sends the same key and gets the run it already created instead of a second one.
 */
function idempotencyKeyFor(config, caseName, fileSha256) {
  const meaning = JSON.stringify([config.build, caseName, fileSha256, config.format ?? null, config.manifest ?? null]);
  return `vgci1-${createHash('sha256').update(meaning).digest('hex')}`;
}

function contentTypeOf(file) {
  const name = file.toLowerCase();
  if (name.endsWith('.gz')) return 'application/gzip';
  if (name.endsWith('.csv')) return 'text/csv';
  if (name.endsWith('.h5') || name.endsWith('.hdf5') || name.endsWith('.he5')) return 'application/x-hdf5';
  if (name.endsWith('.nc') || name.endsWith('.nc4')) return 'application/x-netcdf';
  return 'application/octet-stream';
}

/** The fields POST /api/v1/runs takes besides the file, without the empty ones. */
function runFields(config, caseName) {
  const fields = { build: config.build, commit: config.commit, branch: config.branch, case: caseName };
  if (config.project) fields.project = config.project;
  if (config.ciUrl) fields.ciUrl = config.ciUrl;
  if (config.format) fields.format = config.format;
  return fields;
}

/** Multipart POST; `openAsBlob` lets fetch stream the file from disk instead of reading it whole. */
async function uploadMultipart(ctx, kase, idempotencyKey) {
  const blob = await fs.openAsBlob(kase.file, { type: contentTypeOf(kase.file) });
  const response = await fetchWithRetry(ctx, `upload of ${kase.name}`, `${ctx.baseUrl}/api/v1/runs`, () => {
    const form = new FormData();
    for (const [name, value] of Object.entries(runFields(ctx.config, kase.name))) form.append(name, value);
    if (ctx.config.manifest) form.append('manifest', JSON.stringify(ctx.config.manifest));
    form.append('file', blob, path.basename(kase.file));
    return { method: 'POST', headers: authHeaders(ctx, { 'idempotency-key': idempotencyKey }), body: form };
  });
  return (await response.json()).run;
}

/** Streams the file from disk, reporting bytes as they leave. */
async function* fileChunks(file, onProgress) {
  let sent = 0;
  for await (const chunk of fs.createReadStream(file, { highWaterMark: 1 << 20 })) {
    sent += chunk.length;
    onProgress(sent);
    yield chunk;
  }
}

async function requestPresignedUpload(ctx, kase) {
  const body = JSON.stringify({
    fileName: path.basename(kase.file),
    size: kase.size,
    contentType: contentTypeOf(kase.file),
  });
  const response = await fetchWithRetry(ctx, `presign for ${kase.name}`, `${ctx.baseUrl}/api/v1/uploads`, () => ({
    method: 'POST',
    headers: authHeaders(ctx, { 'content-type': 'application/json' }),
    body,
  }));
  return (await response.json()).upload;
}

async function putToPresignedUrl(ctx, kase, upload) {
  const label = `${kase.name} (presigned upload)`;
  await fetchWithRetry(ctx, label, upload.url, () => ({
    method: upload.method ?? 'PUT',
    // Object stores refuse chunked uploads to presigned URLs: announce the length.
    headers: { ...upload.headers, 'content-length': String(kase.size) },
    body: fileChunks(kase.file, makeProgress(ctx.log, label, kase.size)),
    duplex: 'half',
  }));
}

/**
 * Large files go straight to object storage, then the run is posted as JSON naming the object.
 * Retries of the final POST reuse the object and the key, so they return the same run.
 */
async function uploadPresigned(ctx, kase, idempotencyKey) {
  const upload = await requestPresignedUpload(ctx, kase);
  await putToPresignedUrl(ctx, kase, upload);
  const body = JSON.stringify({
    ...runFields(ctx.config, kase.name),
    ...(ctx.config.manifest ? { manifest: ctx.config.manifest } : {}),
    objectKey: upload.objectKey,
    fileName: path.basename(kase.file),
  });
  try {
    const response = await fetchWithRetry(ctx, `run for ${kase.name}`, `${ctx.baseUrl}/api/v1/runs`, () => ({
      method: 'POST',
      headers: authHeaders(ctx, { 'content-type': 'application/json', 'idempotency-key': idempotencyKey }),
      body,
    }));
    return (await response.json()).run;
  } catch (err) {
    if (err instanceof ApiError && err.code === 'conflict:idempotency') return findEarlierRun(ctx, kase);
    throw err;
  }
}

/**
 * A re-run CI job gets a fresh object key for the same file, and the API counts the object key as
 * part of the request, so the key it used before now answers 409. The content is the same (the key
 * says so), so the run posted earlier for this case in this build is the one to wait for.
 */
async function findEarlierRun(ctx, kase) {
  const query = ctx.config.project ? `?project=${encodeURIComponent(ctx.config.project)}` : '';
  const url = `${ctx.baseUrl}/api/v1/builds/${encodeURIComponent(ctx.config.build)}${query}`;
  const response = await fetchWithRetry(ctx, `build lookup for ${kase.name}`, url, () => ({
    headers: authHeaders(ctx),
  }));
  const run = (await response.json()).runs?.find((r) => r.case === kase.name);
  if (!run)
    throw new ApiError(
      409,
      'conflict:idempotency',
      `The API refused a repeated upload of ${kase.name} and build ${ctx.config.build} has no run for it.`,
    );
  ctx.log.info(`${kase.name}: already uploaded in this build; using run ${run.id}`);
  return { id: run.id, status: run.status, url: run.url };
}

/** Uploads one case and returns its run, choosing multipart or presigned by size. */
async function uploadCase(ctx, kase) {
  const started = Date.now();
  const fileSha256 = await sha256OfFile(kase.file);
  const key = idempotencyKeyFor(ctx.config, kase.name, fileSha256);
  const presigned = kase.size > ctx.config.presignAbove;
  const run = presigned ? await uploadPresigned(ctx, kase, key) : await uploadMultipart(ctx, kase, key);
  const seconds = ((Date.now() - started) / 1000).toFixed(1);
  ctx.log.info(
    `${kase.name}: uploaded ${formatBytes(kase.size)}${presigned ? ' via presigned URL' : ''} in ${seconds} s, run ${run.id}`,
  );
  return run;
}

// ---------------------------------------------------------------------------------------------
// Waiting for verdicts

function newResult(kase) {
  return {
    case: kase.name,
    file: kase.file,
    runId: null,
    url: null,
    status: 'pending',
    verdict: null,
    message: null,
    findings: [],
    timedOut: false,
    startedAt: Date.now(),
    seconds: 0,
  };
}

function markError(result, err) {
  result.verdict = 'error';
  result.timedOut = err instanceof DeadlineError;
  result.status = result.timedOut ? 'timeout' : 'error';
  result.message = err instanceof Error ? err.message : String(err);
  result.seconds = (Date.now() - result.startedAt) / 1000;
}

/**
 * Uploads the cases one after the other (parallel uploads would only split the same link). A 401
 * will repeat for every case, so after one the others are marked without being sent.
 */
async function uploadAll(ctx, results) {
  let authFailure;
  for (const [i, kase] of ctx.config.cases.entries()) {
    const result = results[i];
    result.startedAt = Date.now();
    if (authFailure) {
      markError(result, authFailure);
      continue;
    }
    try {
      const run = await uploadCase(ctx, kase);
      result.runId = run.id;
      result.url = run.url ?? `${ctx.baseUrl}/api/v1/runs/${run.id}`;
      result.status = run.status;
    } catch (err) {
      markError(result, err);
      ctx.log.warn(`${kase.name}: ${result.message}`);
      if (err instanceof ApiError && err.status === 401) authFailure = err;
    }
  }
}

/** One look at a run. Transient failures leave it pending for the next round; others end it. */
async function pollRun(ctx, result) {
  let response;
  try {
    response = await fetch(`${ctx.baseUrl}/api/v1/runs/${encodeURIComponent(result.runId)}`, {
      headers: authHeaders(ctx),
      // At least a second, so a run that finished while the last upload ran is still seen.
      signal: AbortSignal.timeout(Math.max(1000, ctx.deadline - Date.now())),
    });
  } catch (err) {
    if (err?.name !== 'TimeoutError')
      ctx.log.warn(`${result.case}: status check failed (${networkErrorMessage(err)}); will try again`);
    return;
  }
  if (!response.ok) {
    const { code, message } = await describeErrorResponse(response);
    if (isRetryableStatus(response.status))
      ctx.log.warn(`${result.case}: status check answered ${message} [${code}]; will try again`);
    else markError(result, new ApiError(response.status, code, message));
    return;
  }
  let report;
  try {
    report = await response.json();
  } catch (err) {
    markError(
      result,
      new ApiError(response.status, 'invalid:answer', `the status answer is not JSON (${err.message})`),
    );
    return;
  }
  ctx.note ??= report.note;
  result.status = report.run.status;
  result.url = report.run.url ?? result.url;
  if (report.run.status === 'done' || report.run.status === 'error') {
    // A finished run without a verdict cannot be judged: never let it count as a pass.
    result.verdict = report.run.status === 'error' ? 'error' : (report.run.verdict ?? 'error');
    result.findings = report.findings ?? [];
    result.message = report.run.errorMessage ?? result.findings[0]?.message ?? null;
    result.seconds = (Date.now() - result.startedAt) / 1000;
  }
}

/** Polls every unfinished run, a little less often each round, until all are done or time is up. */
async function waitForVerdicts(ctx, results) {
  let intervalS = POLL_FIRST_S;
  for (;;) {
    const pending = results.filter((r) => r.verdict === null);
    if (pending.length === 0) return;
    await Promise.all(pending.map((r) => pollRun(ctx, r)));
    if (results.every((r) => r.verdict !== null)) return;
    const remainingMs = ctx.deadline - Date.now();
    if (remainingMs <= 0) break;
    await sleep(Math.min(intervalS * 1000, remainingMs));
    intervalS = Math.min(intervalS * 1.5, POLL_MAX_S);
  }
  for (const r of results.filter((x) => x.verdict === null)) {
    markError(r, new DeadlineError(`no verdict after ${ctx.timeoutS} s (run still ${r.status})`));
  }
}

// ---------------------------------------------------------------------------------------------
// Reports

/** 2 (could not judge) beats 1 (judged and failed): a gap in the gate must never pass as known. */
function exitCodeOf(results) {
  if (results.some((r) => r.verdict === 'error')) return EXIT.error;
  if (results.some((r) => r.verdict === 'fail')) return EXIT.fail;
  return EXIT.ok;
}

function oneLine(text, width) {
  const flat = String(text ?? '')
    .replace(/\s+/g, ' ')
    .trim();
  return flat.length > width ? `${flat.slice(0, width - 1)}…` : flat;
}

function renderTable(results, note) {
  const rows = results.map((r) => [
    r.case,
    r.verdict ?? '?',
    oneLine(r.message ?? '-', TABLE_MESSAGE_WIDTH) || '-',
    r.url ?? '-',
  ]);
  const header = ['case', 'verdict', 'worst finding', 'link'];
  const widths = header.map((h, col) => Math.max(h.length, ...rows.map((row) => row[col].length)));
  const line = (cells) => cells.map((c, col) => (col === cells.length - 1 ? c : c.padEnd(widths[col]))).join('  ');
  const counts = ['pass', 'warn', 'fail', 'error']
    .map((v) => `${results.filter((r) => r.verdict === v).length} ${v}`)
    .join(', ');
  const out = [
    line(header),
    ...rows.map(line),
    '',
    `${results.length} case${results.length === 1 ? '' : 's'}: ${counts}`,
  ];
  if (note) out.push(oneLine(note, 10_000));
  return `${out.join('\n')}\n`;
}

function renderJson(config, results, note, exitCode) {
  const cases = results.map(({ startedAt: _startedAt, ...r }) => r);
  return `${JSON.stringify({ build: config.build, project: config.project ?? null, exitCode, note: note ?? null, cases }, null, 2)}\n`;
}

/** XML 1.0 forbids most control characters even as references; drop them, escape the rest. */
function xmlEscape(text) {
  return String(text ?? '')
    .replace(
      /[\u0000-\u0008\u000B\u000C\u000E-\u001F\uFFFE\uFFFF]|[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/g,
      '',
    )
    .replace(/&/g, '&amp;')
    .replace(/</g, '&lt;')
    .replace(/>/g, '&gt;')
    .replace(/"/g, '&quot;')
    .replace(/'/g, '&apos;');
}

function findingLines(result) {
  return result.findings
    .map((f) =>
      `${f.severity ?? ''} ${f.variable ?? ''} ${f.kind ?? ''} step ${f.step ?? '?'}: ${f.message ?? ''}`.trim(),
    )
    .join('\n');
}

function junitCase(result, classname) {
  const open = `    <testcase classname="${xmlEscape(classname)}" name="${xmlEscape(result.case)}" time="${result.seconds.toFixed(3)}">`;
  const link = result.url ? `\n${result.url}` : '';
  let body = '';
  if (result.verdict === 'fail') {
    body = `\n      <failure message="${xmlEscape(result.message)}" type="fail">${xmlEscape(findingLines(result) + link)}</failure>\n    `;
  } else if (result.verdict === 'error') {
    const type = result.timedOut ? 'timeout' : 'error';
    body = `\n      <error message="${xmlEscape(result.message)}" type="${type}">${xmlEscape((result.message ?? '') + link)}</error>\n    `;
  } else if (result.verdict === 'warn') {
    body = `\n      <system-out>${xmlEscape(`warn: ${findingLines(result)}${link}`)}</system-out>\n    `;
  }
  return `${open}${body}</testcase>`;
}

function renderJunit(config, results, totalSeconds) {
  const classname = config.project ?? 'varigate';
  const failures = results.filter((r) => r.verdict === 'fail').length;
  const errors = results.filter((r) => r.verdict === 'error').length;
  const attrs = `name="varigate" tests="${results.length}" failures="${failures}" errors="${errors}" time="${totalSeconds.toFixed(3)}"`;
  return [
    '<?xml version="1.0" encoding="UTF-8"?>',
    `<testsuites ${attrs}>`,
    `  <testsuite ${attrs} skipped="0" timestamp="${new Date().toISOString()}">`,
    '    <properties>',
    `      <property name="build" value="${xmlEscape(config.build)}"/>`,
    `      <property name="commit" value="${xmlEscape(config.commit)}"/>`,
    `      <property name="branch" value="${xmlEscape(config.branch)}"/>`,
    '    </properties>',
    ...results.map((r) => junitCase(r, classname)),
    '  </testsuite>',
    '</testsuites>',
    '',
  ].join('\n');
}

// ---------------------------------------------------------------------------------------------

async function run(argv, env) {
  const started = Date.now();
  const config = parseConfig(argv, env);
  if (config.help) {
    process.stdout.write(`${USAGE}\n`);
    return EXIT.ok;
  }
  const log = makeLogger(config.quiet);
  const ctx = {
    config,
    log,
    baseUrl: config.baseUrl,
    token: config.token,
    timeoutS: config.timeoutS,
    deadline: started + config.timeoutS * 1000,
    note: undefined,
  };
  const results = config.cases.map(newResult);

  await uploadAll(ctx, results);
  await waitForVerdicts(ctx, results);

  const exitCode = exitCodeOf(results);
  process.stdout.write(config.json ? renderJson(config, results, ctx.note, exitCode) : renderTable(results, ctx.note));
  if (config.junit) {
    try {
      await writeFile(config.junit, renderJunit(config, results, (Date.now() - started) / 1000));
    } catch (err) {
      // The verdicts are printed already; a lost report must still not pass as green.
      log.warn(`could not write --junit "${config.junit}": ${err.message}`);
      return Math.max(exitCode, EXIT.error);
    }
  }
  return exitCode;
}

run(process.argv.slice(2), process.env).then(
  (code) => {
    process.exitCode = code;
  },
  (err) => {
    if (err instanceof UsageError) {
      process.stderr.write(`varigate-ci: ${err.message}\nRun with --help for usage.\n`);
      process.exitCode = EXIT.usage;
    } else {
      process.stderr.write(`varigate-ci: unexpected failure: ${err?.stack ?? err}\n`);
      process.exitCode = EXIT.error;
    }
  },
);
