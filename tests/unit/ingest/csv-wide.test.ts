import { describe, expect, it } from 'vitest';
import { readAll, readErrorOf, scratchDir } from './helpers';

const { write } = scratchDir();

describe('CSV wide layout', () => {
  it('reads a coordinate column and one column per step headed by its time', async () => {
    const text = 'x,0,0.5,1.0\n0.75,3,4,5\n0.25,1.50,2,2.5\n';
    const { header, steps } = await readAll({ path: write('wide.csv', text) });
    expect(header.format).toBe('csv-wide');
    expect(header.stepCount).toBe(3);
    expect(header.grid.axes[0]!.coordinates).toEqual(Float64Array.of(0.25, 0.75));
    expect(header.variables).toEqual([{ name: 'value', precision: { kind: 'decimal', significantDigits: 3 } }]);
    expect(steps.map((s) => [s.index, s.time, Array.from(s.fields.value!)])).toEqual([
      [0, 0, [1.5, 3]],
      [1, 0.5, [2, 4]],
      [2, 1, [2.5, 5]],
    ]);
    expect(steps[0]!.significantDigits).toEqual({ value: 3 });
  });

  it('reads step=<n> headings and names the variable from the manifest', async () => {
    const text = 'x,step=0,step=20,step=40\n1,0.1,0.2,0.3\n2,0.4,0.5,0.6\n';
    const { header, steps } = await readAll({ path: write('steps.csv', text), manifest: { variables: ['tracer'] } });
    expect(header.variables[0]!.name).toBe('tracer');
    expect(steps.map((s) => [s.index, s.time])).toEqual([
      [0, NaN],
      [20, NaN],
      [40, NaN],
    ]);
  });

  it('is chosen by a declared csv-wide format even when the header could be long', async () => {
    const text = 'step,0,1\n1,2,3\n2,4,5\n';
    const { header, steps } = await readAll({ path: write('declared.csv', text), declaredFormat: 'csv-wide' });
    expect(header.format).toBe('csv-wide');
    expect(header.grid.axes[0]!.name).toBe('step');
    expect(steps.map((s) => Array.from(s.fields.value!))).toEqual([
      [2, 4],
      [3, 5],
    ]);
  });

  it('refuses step columns out of order', async () => {
    const error = await readErrorOf({ path: write('order.csv', 'x,0,1,0.5\n1,1,2,3\n') });
    expect(error.message).toBe(
      'Line 1, column 4: step column "0.5" does not come after "1"; step columns must be in strictly increasing order of step (or time).',
    );
  });

  it('refuses a repeated cell', async () => {
    const error = await readErrorOf({ path: write('dup.csv', 'x,0,1\n1,1,2\n2,1,2\n1,5,6\n') });
    expect(error.message).toBe('Line 4: coordinate x=1 repeats line 2; the wide layout lists each cell once.');
  });

  it('is read whole, so it has its own size limit', async () => {
    const text = 'x,0,1\n' + Array.from({ length: 100 }, (_, i) => `${i},1,2`).join('\n');
    const error = await readErrorOf({ path: write('large.csv', text), limits: { maxWideLayoutBytes: 200 } });
    expect(error.code).toBe('limit');
    expect(error.message).toBe(
      'A wide-layout CSV is read whole, and this one is 695 bytes, over the limit of 200 bytes for that layout. ' +
        'Write the long layout ("step,time,x,<variables>", read step by step) for larger files.',
    );
  });
});
