/**
 * `npx tsx scripts/bench.ts analysis`: speed and memory of the analysis core.
 *
 * 1. One 10-million-cell float64 step (1D, periodic): cells per second of the analyser's full
 *    per-step work (`push`: the metric sweep plus keeping the previous step), of total variation
 *    alone, and of a plain typed-array copy (`Float64Array.prototype.set`, the memory-bandwidth
 *    limit), all in the same run. Where python3 with numpy is available, the same data go to a
 *    temporary file and numpy computes the equivalent metrics (whole-array expressions); the
 *    ratios are printed.
 * 2. Streaming 1 000 steps of 1 million cells through one analyser in a fresh Node process,
 *    printing its peak RSS (target < 300 MB).
 *
 * Timings are the median of several repetitions after a warm-up on smaller data, so the JIT has
 * optimised the loops before the clock starts. Benchmarks measure; they never fail a build.
 */
import { execFile, spawn } from 'node:child_process';
import { mkdtemp, readFile, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { promisify } from 'node:util';
import { createAnalyser } from '../../src/analysis/analyser';
import { totalVariationStrided } from '../../src/analysis/total-variation';

const run1 = promisify(execFile);
const CELLS = 10_000_000;
const STREAM_CELLS = 1_000_000;
const STREAM_STEPS = 1_000;
const REPS = 7;

/**
 * A field like a solver's: two smooth waves (about 12 000 extrema over the line) and a periodic
 * row of plateaus (steps), no noise.
 */
function field(cells: number, shift = 0): Float64Array {
  const x = new Float64Array(cells);
  for (let i = 0; i < cells; i++) {
    const j = (i + shift) % cells;
    x[i] = Math.sin(j * 1e-4) + 0.5 * Math.sin(j * 3.7e-3) + (j % 100_000 < 30_000 ? 1 : 0);
  }
  return x;
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)]!;
}

function time(reps: number, f: () => void): { median: number; best: number } {
  const ms: number[] = [];
  for (let r = 0; r < reps; r++) {
    const t = performance.now();
    f();
    ms.push(performance.now() - t);
  }
  return { median: median(ms), best: Math.min(...ms) };
}

const rate = (cells: number, ms: number): string => `${((cells / ms) * 1e-3).toFixed(0)} Mcells/s`;

function warmUp(): void {
  const small = [field(100_000), field(100_000, 1)];
  const a = createAnalyser({
    name: 'warm',
    grid: { axes: [{ name: 'x', size: 100_000, periodic: true }] },
    precision: { kind: 'float64' },
  });
  for (let k = 0; k < 60; k++) a.push({ index: k, time: k, values: small[k % 2]! });
  for (let k = 0; k < 200; k++) totalVariationStrided(100_000, small[0]!, 1, 0, true);
  const copy = new Float64Array(100_000);
  for (let k = 0; k < 200; k++) copy.set(small[0]!);
}

interface Row {
  label: string;
  ms: number;
}

function measureNode(a: Float64Array, b: Float64Array): Row[] {
  const analyser = createAnalyser({
    name: 'u',
    grid: { axes: [{ name: 'x', size: CELLS, periodic: true }] },
    precision: { kind: 'float64' },
  });
  let index = 0;
  analyser.push({ index: index++, time: 0, values: a });
  // Alternate two steps that differ by a one-cell shift: a clean run (TV does not grow).
  const full = time(REPS, () => analyser.push({ index: index++, time: index, values: index % 2 === 0 ? a : b }));
  const tv = time(REPS, () => totalVariationStrided(CELLS, a, 1, 0, true));
  const dst = new Float64Array(CELLS);
  const copy = time(REPS, () => dst.set(a));
  return [
    { label: 'full metric pass (analyser.push)', ms: full.median },
    { label: 'total variation alone', ms: tv.median },
    { label: 'plain typed-array copy (set)', ms: copy.median },
  ];
}

const NUMPY_SCRIPT = String.raw`
import json, sys, time
import numpy as np
x = np.fromfile(sys.argv[1], dtype='<f8')
prev = np.empty_like(x)
u = 2.0 ** -53
floor = 2 * (u / (1 - u) + 4 * u) * np.abs(x).max()
lo, hi = x.min() - floor, x.max() + floor
def tv():
    return np.abs(np.diff(x, append=x[:1])).sum()
def full():
    d = np.diff(x, append=x[:1])
    ad = np.abs(d)
    total = ad.sum()
    mn, mx, amn, amx = x.min(), x.max(), x.argmin(), x.argmax()
    sg = (d > floor).astype(np.int8) - (d < -floor).astype(np.int8)
    nz = sg[sg != 0]
    extrema = np.count_nonzero(nz[1:] != nz[:-1]) + (1 if nz.size and nz[0] != nz[-1] else 0)
    outside = np.count_nonzero(x > hi) + np.count_nonzero(x < lo)
    ax = np.abs(x)
    mass, l1 = x.sum(), ax.sum()
    flat = sg == 0
    jumps = np.abs(np.diff(sg, prepend=sg[-1:]).astype(np.int16))
    weight = 2 * np.count_nonzero(flat) + jumps.sum()
    weighted = (ax * jumps).sum() + (ax * flat).sum() + (np.roll(ax, -1) * flat).sum()
    bad = np.count_nonzero(~np.isfinite(x))
    np.copyto(prev, x)
    return total, extrema
def copy():
    np.copyto(prev, x)
def median(f, reps=${REPS}):
    ms = []
    f()
    for _ in range(reps):
        t = time.perf_counter(); f(); ms.append((time.perf_counter() - t) * 1e3)
    return sorted(ms)[len(ms) // 2]
print(json.dumps({'full': median(full), 'tv': median(tv), 'copy': median(copy), 'numpy': np.__version__}))
`;

async function measureNumpy(
  a: Float64Array,
): Promise<{ full: number; tv: number; copy: number; numpy: string } | string> {
  const dir = await mkdtemp(path.join(tmpdir(), 'varigate-bench-'));
  try {
    const file = path.join(dir, 'field.f64');
    await writeFile(file, new Uint8Array(a.buffer, a.byteOffset, a.byteLength));
    const script = path.join(dir, 'bench.py');
    await writeFile(script, NUMPY_SCRIPT);
    const { stdout } = await run1('python3', [script, file], { maxBuffer: 1 << 20 });
    return JSON.parse(stdout) as { full: number; tv: number; copy: number; numpy: string };
  } catch (err) {
    return `numpy comparison skipped: ${(err as Error).message.split('\n')[0]}`;
  } finally {
    await rm(dir, { recursive: true, force: true });
  }
}

/** Runs the streaming part in a fresh process so its peak RSS is its own. */
function measureStreaming(): Promise<string> {
  const self = fileURLToPath(import.meta.url);
  return new Promise((resolve, reject) => {
    const child = spawn(process.execPath, ['--import', 'tsx', self], {
      env: { ...process.env, VARIGATE_BENCH_ANALYSIS_CHILD: 'stream' },
      stdio: ['ignore', 'pipe', 'inherit'],
    });
    let out = '';
    child.stdout.on('data', (chunk: Buffer) => (out += chunk.toString()));
    child.on('error', reject);
    child.on('close', (code) => (code === 0 ? resolve(out.trim()) : reject(new Error(`stream child exited ${code}`))));
  });
}

/**
 * Peak resident set of this process from Linux's VmHWM (0 elsewhere). Not
 * `process.resourceUsage().maxRSS`: on Linux that survives exec and so reports the parent's
 * peak, since the child starts as a fork of the (large) benchmark process.
 */
async function highWaterMark(): Promise<number> {
  try {
    const status = await readFile('/proc/self/status', 'utf8');
    const kb = /VmHWM:\s+(\d+) kB/.exec(status)?.[1];
    return kb === undefined ? 0 : Number(kb) * 1024;
  } catch {
    return 0;
  }
}

/** Child: 1 000 steps of a moving profile (one buffer, rewritten per step), then peak RSS. */
async function streamChild(): Promise<void> {
  const base = field(STREAM_CELLS);
  const step = new Float64Array(STREAM_CELLS);
  const analyser = createAnalyser({
    name: 'u',
    grid: { axes: [{ name: 'x', size: STREAM_CELLS, periodic: true }] },
    precision: { kind: 'float64' },
  });
  const start = performance.now();
  let peak = 0;
  for (let k = 0; k < STREAM_STEPS; k++) {
    // The profile moves one cell per step; every 50th step a bump makes TV grow, so the growth
    // window is located as well.
    step.set(base.subarray(STREAM_CELLS - (k % STREAM_CELLS)), 0);
    step.set(base.subarray(0, STREAM_CELLS - (k % STREAM_CELLS)), k % STREAM_CELLS);
    const bump = (k * 7919) % STREAM_CELLS;
    if (k % 50 === 49) step[bump] = step[bump]! + 0.5;
    analyser.push({ index: k, time: k, values: step });
    if (k % 10 === 0) peak = Math.max(peak, process.memoryUsage().rss);
  }
  const summary = analyser.finish();
  const seconds = (performance.now() - start) / 1000;
  const json = JSON.stringify(summary).length;
  peak = Math.max(peak, process.memoryUsage().rss, await highWaterMark());
  console.log(
    `${STREAM_STEPS} steps x ${STREAM_CELLS / 1e6}M cells: ${seconds.toFixed(1)} s ` +
      `(${rate(STREAM_STEPS * STREAM_CELLS, seconds * 1000)}), peak RSS ${(peak / 2 ** 20).toFixed(0)} MB, ` +
      `summary ${(json / 2 ** 20).toFixed(1)} MB of JSON, ${summary.growth.length} growth windows, verdict ${summary.verdict}`,
  );
}

export async function run(): Promise<void> {
  console.log(`node ${process.version}, ${CELLS / 1e6}M-cell float64 step, median of ${REPS}`);
  warmUp();
  const a = field(CELLS);
  const b = field(CELLS, 1);
  const rows = measureNode(a, b);
  for (const r of rows) console.log(`  ${r.label.padEnd(36)} ${r.ms.toFixed(1).padStart(7)} ms  ${rate(CELLS, r.ms)}`);
  const [full, tv, copy] = rows.map((r) => r.ms) as [number, number, number];
  console.log(`  TV alone / copy: ${(tv / copy).toFixed(2)}x the time of the copy (target <= 2)`);
  const np = await measureNumpy(a);
  if (typeof np === 'string') console.log(`  ${np}`);
  else {
    console.log(
      `  numpy ${np.numpy}: full ${np.full.toFixed(1)} ms, TV ${np.tv.toFixed(1)} ms, copy ${np.copy.toFixed(1)} ms`,
    );
    console.log(
      `  full pass: ${(np.full / full).toFixed(2)}x faster than numpy (target >= 2); TV: ${(np.tv / tv).toFixed(2)}x`,
    );
  }
  console.log(`  streaming: ${await measureStreaming()}`);
}

if (process.env.VARIGATE_BENCH_ANALYSIS_CHILD === 'stream') await streamChild();
