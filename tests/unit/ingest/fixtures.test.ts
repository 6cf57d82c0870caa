import { readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { cellCount } from '@/src/analysis/types';
import { runAdvection1d, topHat } from '@/src/analysis/schemes';
import { FIXTURES, readAll, readErrorOf } from './helpers';

interface Entry {
  file: string;
  format: string;
  layout?: string;
  variables?: string[];
  steps?: number;
  grid?: number[];
  error?: string;
}

const index = JSON.parse(readFileSync(path.join(FIXTURES, 'index.json'), 'utf8')) as Entry[];

describe('committed snapshot fixtures', () => {
  it.each(index.filter((e) => e.format !== 'invalid').map((e) => [e.file, e] as const))(
    '%s reads as index.json describes it',
    async (file, entry) => {
      const { header, steps } = await readAll({ path: path.join(FIXTURES, file) });
      expect(header.format).toBe(entry.format);
      expect(header.layout).toBe(entry.layout);
      expect(header.variables.map((v) => v.name)).toEqual(entry.variables);
      expect(header.grid.axes.map((a) => a.size)).toEqual(entry.grid);
      expect(steps).toHaveLength(entry.steps!);
      for (const step of steps) {
        for (const values of Object.values(step.fields)) expect(values).toHaveLength(cellCount(header.grid));
      }
    },
  );

  it.each(index.filter((e) => e.format === 'invalid').map((e) => [e.file, e.error!] as const))(
    '%s is refused with a ReadError',
    async (file, message) => {
      expect((await readErrorOf({ path: path.join(FIXTURES, file) })).message).toContain(message);
    },
  );

  it('the Lax-Wendroff CSV holds the scheme output to the last bit', async () => {
    const { steps } = await readAll({ path: path.join(FIXTURES, 'tophat-lax-wendroff.csv') });
    const expected = runAdvection1d({
      initial: topHat(100, 10, 20),
      courant: 0.2,
      steps: 100,
      scheme: 'lax-wendroff',
      every: 5,
    });
    steps.forEach((s, k) => expect(s.fields.u).toEqual(expected[k]));
    expect(Math.max(...steps[20]!.fields.u!)).toBeGreaterThan(1);
  });

  it('the van Leer CSV stays within [0, 1]', async () => {
    const { steps } = await readAll({ path: path.join(FIXTURES, 'tophat-van-leer.csv') });
    for (const s of steps) {
      expect(Math.min(...s.fields.u!)).toBeGreaterThanOrEqual(0);
      expect(Math.max(...s.fields.u!)).toBeLessThanOrEqual(1);
    }
  });
});
