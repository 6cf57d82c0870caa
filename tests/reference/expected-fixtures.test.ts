/**
 * Source: exact decimal arithmetic (decimal.js, 1200 digits) of fixtures/expected/*.json, made by
 * scripts/fixtures/expected.ts from the exact binary values of the reference runs. The analyser's
 * TV must match to within 4u of its size (Neumaier summation, Higham 2002, "Accuracy and Stability
 * of Numerical Algorithms", section 4.3), its mass to within its own noise bound, and the files
 * must be exactly what the committed generator writes.
 */
import { mkdtemp, readFile, readdir, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { caseSnapshots, EXPECTED_CASES, generate, type ExpectedCase } from '@/scripts/fixtures/expected';
import { analyse, exact, ExactDecimal, line, U64 } from '../unit/analysis/support';

const fixtureDir = path.join(import.meta.dirname, '..', '..', 'fixtures', 'expected');

interface ExpectedFile {
  case: ExpectedCase;
  snapshots: { step: number; tv: string; mass: string; min: number; max: number }[];
}

async function load(name: string): Promise<ExpectedFile> {
  return JSON.parse(await readFile(path.join(fixtureDir, `${name}.json`), 'utf8')) as ExpectedFile;
}

describe.each(EXPECTED_CASES.map((c) => c.name))('expected values of %s', (name) => {
  it('match the analyser: TV within 4u, mass within its noise bound, min and max exactly', async () => {
    const file = await load(name);
    const c = file.case;
    const s = analyse(caseSnapshots(c), line(c.cells, true, 1 / c.cells));
    expect(s.series.index.length).toBe(file.snapshots.length);
    file.snapshots.forEach((e, k) => {
      const tv = new ExactDecimal(e.tv);
      expect(exact(s.series.tv[k]!).minus(tv).abs().toNumber()).toBeLessThanOrEqual(4 * U64 * tv.toNumber());
      const mass = new ExactDecimal(e.mass);
      expect(exact(s.series.mass[k]!).minus(mass).abs().toNumber()).toBeLessThanOrEqual(s.series.massNoise[k]!);
      expect(s.series.min[k]).toBe(e.min);
      expect(s.series.max[k]).toBe(e.max);
    });
  });
});

describe('fixtures/expected', () => {
  let scratch = '';
  afterAll(async () => {
    if (scratch !== '') await rm(scratch, { recursive: true, force: true });
  });

  it('are byte for byte what scripts/fixtures/expected.ts generates', async () => {
    scratch = await mkdtemp(path.join(tmpdir(), 'varigate-expected-'));
    const written = await generate(scratch);
    expect(written.map((f) => path.basename(f)).sort()).toEqual((await readdir(fixtureDir)).sort());
    for (const file of written) {
      const committed = await readFile(path.join(fixtureDir, path.basename(file)), 'utf8');
      expect(await readFile(file, 'utf8')).toBe(committed);
    }
  });
});
