import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll } from 'vitest';
import { openSnapshots, ReadError, type OpenSnapshotsInput } from '@/src/ingest';
import type { SnapshotHeader, SnapshotStep } from '@/src/ingest/types';

export const FIXTURES = path.join(import.meta.dirname, '..', '..', '..', 'fixtures', 'snapshots');

/** A private temp directory for one test file, removed after its tests. */
export function scratchDir(): { dir: string; write: (name: string, data: string | Uint8Array) => string } {
  const dir = mkdtempSync(path.join(os.tmpdir(), 'varigate-test-'));
  afterAll(() => rmSync(dir, { recursive: true, force: true }));
  let n = 0;
  return {
    dir,
    write(name, data) {
      n += 1;
      const file = path.join(dir, `${n}-${name}`);
      writeFileSync(file, data);
      return file;
    },
  };
}

export interface ReadAll {
  header: SnapshotHeader;
  steps: SnapshotStep[];
}

/** Opens and reads every step, closing the reader in all cases. */
export async function readAll(input: OpenSnapshotsInput): Promise<ReadAll> {
  const reader = await openSnapshots(input);
  const steps: SnapshotStep[] = [];
  try {
    for await (const step of reader.steps) steps.push(step);
  } finally {
    await reader.close();
  }
  return { header: reader.header, steps };
}

/**
 * Reads until the first error and returns it with the steps delivered before it; fails the
 * test when the input reads without error or throws something other than a ReadError.
 */
export async function readUntilError(input: OpenSnapshotsInput): Promise<{ error: ReadError; steps: SnapshotStep[] }> {
  const steps: SnapshotStep[] = [];
  let reader: Awaited<ReturnType<typeof openSnapshots>> | null = null;
  try {
    reader = await openSnapshots(input);
    for await (const step of reader.steps) steps.push(step);
  } catch (error) {
    if (error instanceof ReadError) return { error, steps };
    throw error;
  } finally {
    await reader?.close();
  }
  throw new Error(`expected a ReadError, but ${steps.length} steps were read`);
}

export async function readErrorOf(input: OpenSnapshotsInput): Promise<ReadError> {
  return (await readUntilError(input)).error;
}

/** `step,time,x,u` rows for a 1D grid: value(step k, cell i) given by `f`. */
export function longCsv(
  cells: number,
  steps: number,
  f: (k: number, i: number) => string = (k, i) => String(k + i / 10),
): string {
  let text = 'step,time,x,u\n';
  for (let k = 0; k < steps; k++) {
    for (let i = 0; i < cells; i++) text += `${k * 10},${k / 2},${(i + 0.5) / cells},${f(k, i)}\n`;
  }
  return text;
}
