/**
 * Ingestion throughput and memory: `npx tsx scripts/bench.ts ingest`.
 *
 * Writes a long-layout CSV and the same data as float64 HDF5 (dataset per variable) into a
 * private temp directory, then reads each end to end in a child process, so that each figure
 * has its own peak RSS: a plain read of the CSV bytes (the I/O limit), the CSV reader, and
 * the HDF5 reader, each alone and then with src/analysis's streaming analyser fed every step.
 * The temp directory is removed afterwards, also on failure.
 *
 * Size: VARIGATE_BENCH_STEPS (default 100) × VARIGATE_BENCH_CELLS (default 50 000) cells,
 * about 200 MB of CSV at the default. Benchmarks measure; they never fail a build.
 */
import { spawn } from 'node:child_process';
import { once } from 'node:events';
import { createReadStream, createWriteStream, type WriteStream } from 'node:fs';
import { mkdtemp, rm, stat } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const STEPS = Number(process.env.VARIGATE_BENCH_STEPS ?? 100);
const CELLS = Number(process.env.VARIGATE_BENCH_CELLS ?? 50_000);

type Mode = 'bytes' | 'csv' | 'hdf5' | 'csv+analysis' | 'hdf5+analysis' | 'baseline';

interface ChildResult {
  mode: Mode;
  /** One-time loading of the h5wasm module before the timed read (HDF5 only). */
  loadSeconds: number;
  /** Timed part: open, read every step, close. */
  seconds: number;
  steps: number;
  /** RSS once modules are loaded, before reading. */
  rssBeforeMb: number;
  /** Largest RSS sampled while reading (every step and every 20 ms). */
  peakReadRssMb: number;
  /** Peak RSS of the whole child process, module loading included. */
  maxRssMb: number;
  analysed: boolean;
  checksum: number;
}

export async function run(): Promise<void> {
  const dir = await mkdtemp(path.join(os.tmpdir(), 'varigate-bench-'));
  try {
    const csvFile = path.join(dir, 'bench.csv');
    const h5File = path.join(dir, 'bench.h5');
    const t0 = performance.now();
    await writeCsv(csvFile);
    const t1 = performance.now();
    await writeHdf5(h5File);
    await writeTinyHdf5(path.join(dir, 'tiny.h5'));
    const t2 = performance.now();
    const csvBytes = (await stat(csvFile)).size;
    const h5Bytes = (await stat(h5File)).size;
    console.log(
      `data: ${STEPS} steps × ${CELLS} cells, 1 variable; CSV ${mb(csvBytes)} MB ` +
        `(written in ${((t1 - t0) / 1000).toFixed(1)} s), HDF5 ${mb(h5Bytes)} MB ` +
        `(${((t2 - t1) / 1000).toFixed(1)} s); machine: ${os.cpus().length} cores, ` +
        `Node ${process.version}`,
    );
    const results: [string, ChildResult, number][] = [];
    results.push(['node + modules loaded (h5wasm too), nothing read', await child('baseline', csvFile), 0]);
    results.push(['plain read of the CSV bytes (I/O limit)', await child('bytes', csvFile), csvBytes]);
    results.push(['CSV long layout, openSnapshots end to end', await child('csv', csvFile), csvBytes]);
    results.push(['HDF5 float64, openSnapshots end to end', await child('hdf5', h5File), h5Bytes]);
    results.push(['CSV long layout, read + createAnalyser', await child('csv+analysis', csvFile), csvBytes]);
    results.push(['HDF5 float64, read + createAnalyser', await child('hdf5+analysis', h5File), h5Bytes]);
    console.log(
      '| read | steps | seconds | MB/s (file) | Mcells/s | RSS before read MB | peak RSS while reading MB | peak RSS of process MB | analysed |',
    );
    console.log('| --- | ---: | ---: | ---: | ---: | ---: | ---: | ---: | --- |');
    for (const [label, r, bytes] of results) {
      const rate = bytes > 0 ? (bytes / 1e6 / r.seconds).toFixed(1) : '-';
      const cells = r.steps > 0 ? ((r.steps * CELLS) / 1e6 / r.seconds).toFixed(1) : '-';
      console.log(
        `| ${label} | ${r.steps || '-'} | ${r.seconds.toFixed(2)} | ${rate} | ${cells} | ` +
          `${r.rssBeforeMb.toFixed(0)} | ${r.peakReadRssMb.toFixed(0)} | ${r.maxRssMb.toFixed(0)} | ` +
          `${r.analysed ? 'yes' : 'no'} |`,
      );
    }
    const csv = results[2]![1];
    const h5 = results[3]![1];
    console.log(
      `HDF5 / CSV throughput in cells per second: ${(csv.seconds / h5.seconds).toFixed(1)}×; ` +
        `one-time h5wasm module load before the HDF5 read: ${h5.loadSeconds.toFixed(2)} s`,
    );
  } finally {
    await rm(dir, { recursive: true, force: true });
  }
}

function mb(bytes: number): string {
  return (bytes / 1e6).toFixed(1);
}

/** A smooth field that drifts with the step; written with 17 significant digits (the most work per field). */
function value(step: number, cell: number): number {
  return Math.sin((2 * Math.PI * (cell + 0.5)) / CELLS + step * 0.01);
}

async function writeCsv(file: string): Promise<void> {
  const out = createWriteStream(file);
  await write(out, 'step,time,x,u\n');
  const x = Array.from({ length: CELLS }, (_, i) => String((i + 0.5) / CELLS));
  for (let s = 0; s < STEPS; s++) {
    const prefix = `${s},${Number((s * 1e-3).toPrecision(12))},`;
    let chunk = '';
    for (let i = 0; i < CELLS; i++) {
      chunk += `${prefix}${x[i]},${value(s, i).toPrecision(17)}\n`;
      if (chunk.length > 1 << 20) {
        await write(out, chunk);
        chunk = '';
      }
    }
    await write(out, chunk);
  }
  await new Promise<void>((resolve, reject) => out.end((error?: Error | null) => (error ? reject(error) : resolve())));
}

async function write(out: WriteStream, text: string): Promise<void> {
  if (!out.write(text)) await once(out, 'drain');
}

async function writeHdf5(file: string): Promise<void> {
  const h5wasm = (await import('h5wasm/node')).default;
  await h5wasm.ready;
  const f = new h5wasm.File(file, 'w');
  try {
    const step = new Float64Array(CELLS);
    const fill = (s: number) => {
      for (let i = 0; i < CELLS; i++) step[i] = value(s, i);
    };
    fill(0);
    const u = f.create_dataset({
      name: 'u',
      data: step,
      shape: [1, CELLS],
      maxshape: [null, CELLS],
      chunks: [1, CELLS],
      dtype: '<d',
    });
    for (let s = 1; s < STEPS; s++) {
      fill(s);
      u.resize([s + 1, CELLS]);
      u.write_slice([[s, s + 1], []], step);
    }
    f.create_dataset({
      name: 'time',
      data: Float64Array.from({ length: STEPS }, (_, s) => Number((s * 1e-3).toPrecision(12))),
    });
    f.create_dataset({
      name: 'x',
      data: Float64Array.from({ length: CELLS }, (_, i) => (i + 0.5) / CELLS),
    });
  } finally {
    f.close();
  }
}

async function writeTinyHdf5(file: string): Promise<void> {
  const h5wasm = (await import('h5wasm/node')).default;
  await h5wasm.ready;
  const f = new h5wasm.File(file, 'w');
  try {
    f.create_dataset({ name: 'u', data: Float64Array.of(0, 1, 2, 3), shape: [2, 2], dtype: '<d' });
  } finally {
    f.close();
  }
}

/** Runs one measurement in a fresh Node process so its peak RSS is its own. */
function child(mode: Mode, file: string): Promise<ChildResult> {
  const self = fileURLToPath(import.meta.url);
  return new Promise((resolve, reject) => {
    const proc = spawn(process.execPath, ['--import', 'tsx', self, '--child', mode, file], {
      stdio: ['ignore', 'pipe', 'inherit'],
      cwd: path.join(path.dirname(self), '..', '..'),
    });
    let out = '';
    proc.stdout.on('data', (chunk: Buffer) => {
      out += chunk.toString();
    });
    proc.on('error', reject);
    proc.on('close', (code) => {
      if (code !== 0) {
        reject(new Error(`bench child ${mode} exited with ${code}: ${out}`));
        return;
      }
      resolve(JSON.parse(out.trim().split('\n').pop() as string) as ChildResult);
    });
  });
}

async function childMain(mode: Mode, file: string): Promise<void> {
  const { openSnapshots } = await import('@/src/ingest');
  const { createAnalyser } = await import('@/src/analysis');
  let loadSeconds = 0;
  if (mode.startsWith('hdf5') || mode === 'baseline') {
    // Loading the wasm module is a one-time cost per process; measured apart from the read
    // by opening a tiny file first (which loads h5wasm the way the reader does).
    const t = performance.now();
    const warm = await openSnapshots({ path: file.replace(/bench\.(csv|h5)$/, 'tiny.h5') });
    await warm.close();
    loadSeconds = (performance.now() - t) / 1000;
  }
  const rssBeforeMb = process.memoryUsage().rss / 1e6;
  let peak = rssBeforeMb;
  const sample = () => {
    peak = Math.max(peak, process.memoryUsage().rss / 1e6);
  };
  const timer = setInterval(sample, 20);
  const start = performance.now();
  let steps = 0;
  let checksum = 0;
  let analysed = false;
  try {
    if (mode === 'bytes') {
      for await (const chunk of createReadStream(file, { highWaterMark: 64 * 1024 })) {
        checksum += (chunk as Buffer)[0] ?? 0;
      }
    } else if (mode !== 'baseline') {
      const reader = await openSnapshots({ path: file });
      analysed = mode.endsWith('+analysis');
      // One streaming analyser per variable, fed each step as it is read.
      const analysers = analysed
        ? reader.header.variables.map((v) =>
            createAnalyser({ name: v.name, grid: reader.header.grid, precision: v.precision }),
          )
        : [];
      try {
        for await (const step of reader.steps) {
          steps++;
          const u = step.fields.u!;
          checksum += u[0]! + u[u.length - 1]!;
          for (const analyser of analysers) {
            analyser.push(
              { index: step.index, time: step.time, values: step.fields[analyser.variable]! },
              step.significantDigits?.[analyser.variable],
            );
          }
          sample();
        }
        for (const analyser of analysers) checksum += analyser.finish().metrics ? 1 : 0;
      } finally {
        await reader.close();
      }
    }
  } finally {
    clearInterval(timer);
  }
  const seconds = (performance.now() - start) / 1000;
  sample();
  const maxRssMb = process.resourceUsage().maxRSS / 1024;
  const result: ChildResult = {
    mode,
    loadSeconds,
    seconds,
    steps,
    rssBeforeMb,
    peakReadRssMb: peak,
    maxRssMb,
    analysed,
    checksum,
  };
  process.stdout.write(`${JSON.stringify(result)}\n`);
}

if (process.argv[2] === '--child') {
  await childMain(process.argv[3] as Mode, process.argv[4] as string);
}
