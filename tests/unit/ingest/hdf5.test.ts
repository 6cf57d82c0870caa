import { readFileSync } from 'node:fs';
import path from 'node:path';
import h5wasm, { type Dataset } from 'h5wasm/node';
import { beforeAll, describe, expect, it } from 'vitest';
import { runAdvection1d, topHat } from '@/src/analysis/schemes';
import { openSnapshots } from '@/src/ingest';
import { FIXTURES, readAll, readErrorOf, readUntilError, scratchDir } from './helpers';

const { dir, write } = scratchDir();
let counter = 0;

beforeAll(async () => {
  await h5wasm.ready;
});

/** Writes an HDF5 file in the scratch dir with `build`, returns its path. */
function h5(build: (f: InstanceType<typeof h5wasm.File>) => void): string {
  counter += 1;
  const file = path.join(dir, `made-${counter}.h5`);
  const f = new h5wasm.File(file, 'w');
  try {
    build(f);
  } finally {
    f.close();
  }
  return file;
}

const ramp = (n: number, scale = 1) => Float64Array.from({ length: n }, (_, i) => i * scale);

describe('HDF5, dataset per variable', () => {
  it('reads the fixture exactly as the scheme computed it', async () => {
    const { header, steps } = await readAll({ path: path.join(FIXTURES, 'tophat-lax-wendroff.h5') });
    const expected = runAdvection1d({
      initial: topHat(100, 10, 20),
      courant: 0.2,
      steps: 100,
      scheme: 'lax-wendroff',
      every: 5,
    });
    expect(header.format).toBe('hdf5');
    expect(header.layout).toBe('dataset-per-variable');
    expect(header.stepCount).toBe(21);
    expect(header.variables).toEqual([{ name: 'u', precision: { kind: 'float64' } }]);
    expect(header.grid.axes[0]).toMatchObject({ name: 'x', size: 100, periodic: true });
    expect(steps.map((s) => s.index)).toEqual(expected.map((_, k) => k * 5));
    expect(steps[7]!.time).toBeCloseTo(0.07, 15);
    steps.forEach((s, k) => expect(s.fields.u).toEqual(expected[k]));
    expect(steps[0]!.significantDigits).toBeUndefined();
  });

  it('keeps float32 data as float32 and records the precision', async () => {
    const { header, steps } = await readAll({ path: path.join(FIXTURES, 'tophat-van-leer-float32.h5') });
    expect(header.variables[0]!.precision).toEqual({ kind: 'float32' });
    expect(steps[3]!.fields.u).toBeInstanceOf(Float32Array);
    expect(header.grid.axes[0]).toEqual({ name: 'x', size: 100, periodic: true, spacing: 0.01 });
  });

  it('reads a 2D variable [steps, ny, nx] with its coordinate datasets', async () => {
    const { header, steps } = await readAll({ path: path.join(FIXTURES, 'square-superbee-2d.h5') });
    expect(header.grid.axes.map((a) => [a.name, a.size, a.periodic])).toEqual([
      ['y', 12, true],
      ['x', 20, true],
    ]);
    expect(steps).toHaveLength(9);
    expect(steps[0]!.fields.u![2 * 20 + 3]).toBe(1);
    expect(steps[0]!.fields.u![0]).toBe(0);
  });

  it('reads a NetCDF-4 style file through its attached dimension scales', async () => {
    const { header, steps } = await readAll({ path: path.join(FIXTURES, 'estuary-salinity.nc') });
    expect(header.variables.map((v) => v.name)).toEqual(['salinity']);
    expect(header.grid.axes.map((a) => [a.name, a.size])).toEqual([
      ['y', 12],
      ['x', 20],
    ]);
    expect(header.grid.axes[1]!.coordinates![0]).toBe(100);
    expect(steps.map((s) => s.time)).toEqual([0, 0.04, 0.08, 0.12, 0.16, 0.2, 0.24, 0.28, 0.32]);
  });

  it('finds the superblock after a user block', async () => {
    const original = readFileSync(path.join(FIXTURES, 'tophat-lax-wendroff.h5'));
    const file = write('userblock.h5', Buffer.concat([Buffer.alloc(512, 0x20), original]));
    const { steps } = await readAll({ path: file });
    expect(steps).toHaveLength(21);
  });

  it('uses manifest names for variables and coordinates, and reads 3D', async () => {
    const file = h5((f) => {
      f.create_dataset({ name: 'temp', data: ramp(2 * 2 * 3 * 4), shape: [2, 2, 3, 4], dtype: '<d' });
      f.create_dataset({ name: 'salt', data: ramp(2 * 2 * 3 * 4, 2), shape: [2, 2, 3, 4], dtype: '<d' });
      f.create_dataset({ name: 'lon', data: Float64Array.of(1, 2, 3, 4) });
      f.create_dataset({ name: 'depth', data: Float64Array.of(-10, -5) });
      f.create_attribute('periodic', 'lon');
    });
    const { header, steps } = await readAll({
      path: file,
      manifest: { variables: ['salt'], columns: { x: 'lon', z: 'depth' } },
    });
    expect(header.variables.map((v) => v.name)).toEqual(['salt']);
    expect(header.grid.axes.map((a) => [a.name, a.size, a.periodic, a.coordinates?.length])).toEqual([
      ['depth', 2, false, 2],
      ['y', 3, false, undefined],
      ['lon', 4, true, 4],
    ]);
    expect(Array.from(steps[1]!.fields.salt!.subarray(0, 3))).toEqual([48, 50, 52]);
  });

  it('skips datasets that cannot be variables and says so', async () => {
    const file = h5((f) => {
      f.create_dataset({ name: 'u', data: ramp(6), shape: [2, 3], dtype: '<d' });
      f.create_dataset({ name: 'mask', data: Int32Array.of(1, 1, 0, 1, 1, 0), shape: [2, 3] });
      f.create_dataset({ name: 'title', data: ['lagoon run'] });
    });
    const { header } = await readAll({ path: file });
    expect(header.variables.map((v) => v.name)).toEqual(['u']);
    expect(header.notes).toEqual([
      'skipped dataset /mask holds 32-bit integers; a variable holds float32 or float64 values',
      'skipped dataset /title holds strings; a variable holds float32 or float64 values',
    ]);
  });

  it('reads step numbers from /step and per-axis periodic flags', async () => {
    const file = h5((f) => {
      f.create_dataset({ name: 'u', data: ramp(12), shape: [3, 2, 2], dtype: '<d' });
      f.create_dataset({ name: 'step', data: Int32Array.of(100, 200, 400) });
      (f.get('u') as Dataset).create_attribute('periodic', Int8Array.of(0, 1));
      f.create_attribute('dx', 0.5);
    });
    const { header, steps } = await readAll({ path: file });
    expect(steps.map((s) => [s.index, s.time])).toEqual([
      [100, NaN],
      [200, NaN],
      [400, NaN],
    ]);
    expect(header.grid.axes).toEqual([
      { name: 'y', size: 2, periodic: false },
      { name: 'x', size: 2, periodic: true, spacing: 0.5 },
    ]);
  });

  it('stops after close and can be closed twice', async () => {
    const reader = await openSnapshots({ path: path.join(FIXTURES, 'tophat-lax-wendroff.h5') });
    const seen: number[] = [];
    for await (const step of reader.steps) {
      seen.push(step.index);
      if (seen.length === 3) await reader.close();
    }
    await reader.close();
    expect(seen).toEqual([0, 5, 10]);
  });
});

describe('HDF5, group per step', () => {
  it('reads /step_<n>/<variable> groups in step order with their time attribute', async () => {
    const { header, steps } = await readAll({ path: path.join(FIXTURES, 'tophat-van-leer-groups.h5') });
    expect(header.layout).toBe('group-per-step');
    expect(header.stepCount).toBe(21);
    expect(header.grid.axes[0]!.coordinates).toHaveLength(100);
    expect(steps.map((s) => s.index)).toEqual(Array.from({ length: 21 }, (_, k) => k * 5));
    expect(steps[20]!.time).toBeCloseTo(0.2, 15);
  });

  it('orders groups by number, not by name', async () => {
    const file = h5((f) => {
      for (const n of [100, 20, 3]) {
        const g = f.create_group(`step_${n}`);
        g.create_dataset({ name: 'u', data: Float64Array.of(n, n) });
      }
    });
    const { steps } = await readAll({ path: file });
    expect(steps.map((s) => [s.index, s.fields.u![0]])).toEqual([
      [3, 3],
      [20, 20],
      [100, 100],
    ]);
  });

  it('refuses a later group that lacks a variable', async () => {
    const file = h5((f) => {
      f.create_group('step_1').create_dataset({ name: 'u', data: Float64Array.of(1, 2) });
      f.create_group('step_2').create_dataset({ name: 'v', data: Float64Array.of(1, 2) });
    });
    const { error, steps } = await readUntilError({ path: file });
    expect(steps).toHaveLength(1);
    expect(error.message).toBe('Group /step_2 has no dataset u; every step group must hold every variable.');
    expect(error.where).toBe('dataset /step_2/u');
  });

  it('refuses a later group whose variable changed shape', async () => {
    const file = h5((f) => {
      f.create_group('step_1').create_dataset({ name: 'u', data: Float64Array.of(1, 2) });
      f.create_group('step_2').create_dataset({ name: 'u', data: Float64Array.of(1, 2, 3) });
    });
    const error = await readErrorOf({ path: file });
    expect(error.message).toBe(
      'Dataset /step_2/u holds 64-bit floats with shape [3]; the first step group has float64 with shape [2], and every step must match it.',
    );
  });
});

describe('bad HDF5 input', () => {
  it('a file that claims to be HDF5 but is not', async () => {
    const error = await readErrorOf({ path: path.join(FIXTURES, 'not-hdf5.h5') });
    expect(error.message).toBe(
      'The file is named "not-hdf5.h5" but is not HDF5: no HDF5 signature (\\x89HDF\\r\\n\\x1a\\n) at byte 0, 512, 1024, ' +
        '2048 or any later doubling; it begins with bytes 73 74 65 70 2c 74 69 6d ("step,tim").',
    );
    const declared = await readErrorOf({ path: write('data.bin', 'hello'), declaredFormat: 'application/x-hdf5' });
    expect(declared.message).toContain('The file is declared as "application/x-hdf5" but is not HDF5');
  });

  it('a truncated file', async () => {
    const error = await readErrorOf({ path: path.join(FIXTURES, 'truncated.h5') });
    expect(error.message).toBe(
      'The HDF5 file is truncated: it is 9950 bytes long but its superblock records 19900 bytes (19.4 KiB). ' +
        'The upload or copy was probably interrupted; upload the complete file.',
    );
    expect(error.code).toBe('truncated');
  });

  it('a file cut inside its superblock', async () => {
    const original = readFileSync(path.join(FIXTURES, 'tophat-lax-wendroff.h5'));
    const error = await readErrorOf({ path: write('cut.h5', original.subarray(0, 20)) });
    expect(error.message).toBe(
      'The HDF5 file is cut off inside its superblock (it is 20 bytes long); upload the complete file.',
    );
  });

  it('a damaged compressed chunk is an error, never garbage values', async () => {
    const file = h5((f) => {
      f.create_dataset({
        name: 'u',
        data: Float64Array.from({ length: 20000 }, (_, i) => Math.sin(i)),
        shape: [20, 1000],
        dtype: '<d',
        chunks: [1, 1000],
        compression: 6,
      });
    });
    const bytes = readFileSync(file);
    const middle = Math.floor(bytes.length / 2);
    bytes.fill(0x55, middle, middle + 200);
    const { error, steps } = await readUntilError({ path: write('damaged.h5', bytes) });
    expect(steps.length).toBeGreaterThan(0);
    expect(steps.length).toBeLessThan(20);
    expect(error.message).toMatch(
      new RegExp(
        `^HDF5 could not read dataset /u, step index ${steps.length} \\(.+\\); the file is damaged or incomplete\\.$`,
      ),
    );
    expect(error.where).toBe(`dataset /u, step index ${steps.length}`);
    expect(error.code).toBe('damaged');
  });

  it('a dataset of the wrong rank', async () => {
    const file = h5((f) => f.create_dataset({ name: 'rho', data: ramp(100) }));
    const error = await readErrorOf({ path: file });
    expect(error.message).toBe(
      'No variable found in the HDF5 file: expected float32/float64 datasets shaped [steps, nx], [steps, ny, nx] or ' +
        '[steps, nz, ny, nx] at the root, or groups named step_<n> holding one dataset per variable. Not usable: ' +
        '/rho has shape [100] (1 dimension); a variable is shaped [steps, nx], [steps, ny, nx] or [steps, nz, ny, nx].',
    );
    const named = await readErrorOf({ path: file, manifest: { variables: ['rho'] } });
    expect(named.message).toBe(
      'Dataset /rho has shape [100] (1 dimension); a variable is shaped [steps, nx], [steps, ny, nx] or [steps, nz, ny, nx].',
    );
    expect(named.where).toBe('/rho');
    const five = h5((f) => f.create_dataset({ name: 'rho', data: ramp(32), shape: [2, 2, 2, 2, 2], dtype: '<d' }));
    expect((await readErrorOf({ path: five, manifest: { variables: ['rho'] } })).message).toBe(
      'Dataset /rho has shape [2, 2, 2, 2, 2] (5 dimensions); a variable is shaped [steps, nx], [steps, ny, nx] or [steps, nz, ny, nx].',
    );
  });

  it('a dataset of strings', async () => {
    const file = h5((f) => f.create_dataset({ name: 'rho', data: ['a', 'b', 'c', 'd'], shape: [2, 2] }));
    const error = await readErrorOf({ path: file, manifest: { variables: ['rho'] } });
    expect(error.message).toBe('Dataset /rho holds strings; a variable holds float32 or float64 values.');
  });

  it('a variable named in the manifest that the file lacks', async () => {
    const file = h5((f) => f.create_dataset({ name: 'u', data: ramp(4), shape: [2, 2], dtype: '<d' }));
    const error = await readErrorOf({ path: file, manifest: { variables: ['rho'] } });
    expect(error.message).toBe(
      'The manifest names variable "rho", but the file has no dataset /rho at its root (root holds /u).',
    );
  });

  it('variables on different grids', async () => {
    const file = h5((f) => {
      f.create_dataset({ name: 'a', data: ramp(4), shape: [2, 2], dtype: '<d' });
      f.create_dataset({ name: 'b', data: ramp(6), shape: [2, 3], dtype: '<d' });
    });
    expect((await readErrorOf({ path: file })).message).toBe(
      'Dataset /b has shape [2, 3] but /a has shape [2, 2]; all variables of a file must share the steps and the grid.',
    );
  });

  it('a time dataset of the wrong length, and step numbers that do not increase', async () => {
    const badTime = h5((f) => {
      f.create_dataset({ name: 'u', data: ramp(6), shape: [3, 2], dtype: '<d' });
      f.create_dataset({ name: 'time', data: Float64Array.of(0, 1) });
    });
    expect((await readErrorOf({ path: badTime })).message).toBe(
      'Dataset /time (the time of each step) holds 64-bit floats with shape [2]; expected 3 numbers, one per step.',
    );
    const badSteps = h5((f) => {
      f.create_dataset({ name: 'u', data: ramp(6), shape: [3, 2], dtype: '<d' });
      f.create_dataset({ name: 'step', data: Int32Array.of(0, 10, 10) });
    });
    const error = await readErrorOf({ path: badSteps });
    expect(error.message).toBe(
      'Dataset /step, index 2: step 10 does not come after step 10; step numbers must strictly increase (no step twice).',
    );
    expect(error.where).toBe('/step, index 2');
  });

  it('coordinates that do not increase', async () => {
    const file = h5((f) => {
      f.create_dataset({ name: 'u', data: ramp(6), shape: [2, 3], dtype: '<d' });
      f.create_dataset({ name: 'x', data: Float64Array.of(0, 2, 1) });
    });
    expect((await readErrorOf({ path: file })).message).toBe(
      'Coordinate dataset /x, index 2: 1 does not come after 2; cell centres must strictly increase along each axis.',
    );
  });

  it('more cells or steps than the limits', async () => {
    const file = path.join(FIXTURES, 'square-superbee-2d.h5');
    const cells = await readErrorOf({ path: file, limits: { maxCellsPerStep: 100 } });
    expect(cells.message).toBe('Dataset /u has 12 × 20 = 240 cells per step; the limit is 100 cells per step.');
    expect(cells.code).toBe('limit');
    const steps = await readErrorOf({ path: file, limits: { maxSteps: 5 } });
    expect(steps.message).toBe('Dataset /u holds 9 steps; the limit is 5 steps per file.');
  });

  it('an empty variable', async () => {
    const file = h5((f) => f.create_dataset({ name: 'u', data: new Float64Array(0), shape: [0, 4], dtype: '<d' }));
    expect((await readErrorOf({ path: file })).message).toBe(
      'Dataset /u is empty (0 steps, grid [4]); expected at least one step and one cell.',
    );
  });

  it('a CSV layout forced on an HDF5 file', async () => {
    const error = await readErrorOf({
      path: path.join(FIXTURES, 'tophat-lax-wendroff.h5'),
      manifest: { layout: 'long' },
    });
    expect(error.message).toBe('The manifest says layout "long", a CSV layout, but the file is HDF5.');
  });
});
