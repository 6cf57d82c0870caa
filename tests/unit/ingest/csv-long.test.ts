import { gzipSync } from 'node:zlib';
import { describe, expect, it } from 'vitest';
import { longCsv, readAll, readUntilError, scratchDir } from './helpers';

const { write } = scratchDir();

describe('CSV long layout', () => {
  it('reads a 1D file into steps with the grid from the first step', async () => {
    const file = write('a.csv', 'step,time,x,rho\n0,0,0.5,1.25\n0,0,1.5,2\n10,0.1,0.5,1.5\n10,0.1,1.5,2.5\n');
    const { header, steps } = await readAll({ path: file });
    expect(header.format).toBe('csv-long');
    expect(header.layout).toBe('long');
    expect(header.grid.axes).toEqual([
      { name: 'x', size: 2, periodic: false, coordinates: Float64Array.of(0.5, 1.5), spacing: 1 },
    ]);
    expect(header.variables).toEqual([{ name: 'rho', precision: { kind: 'decimal', significantDigits: 3 } }]);
    expect(header.text).toEqual({ delimiter: ',', decimalMark: '.' });
    expect(steps.map((s) => [s.index, s.time, Array.from(s.fields.rho!)])).toEqual([
      [0, 0, [1.25, 2]],
      [10, 0.1, [1.5, 2.5]],
    ]);
    expect(steps.map((s) => s.significantDigits)).toEqual([{ rho: 3 }, { rho: 2 }]);
  });

  it('sorts rows given in any cell order into the grid, each step in its own order', async () => {
    const file = write(
      'shuffled.csv',
      'step,time,x,u\n0,0,3,30\n0,0,1,10\n0,0,2,20\n1,1,2,21\n1,1,3,31\n1,1,1,11\n2,2,1,12\n2,2,2,22\n2,2,3,32\n',
    );
    const { steps } = await readAll({ path: file });
    expect(steps.map((s) => Array.from(s.fields.u!))).toEqual([
      [10, 20, 30],
      [11, 21, 31],
      [12, 22, 32],
    ]);
  });

  it('builds a 2D grid [y, x] with x fastest from rows written x-major', async () => {
    let text = 'step,time,x,y,u\n';
    for (const x of [0, 1, 2]) for (const y of [10, 20]) text += `0,0,${x},${y},${y + x}\n`;
    const { header, steps } = await readAll({ path: write('2d.csv', text) });
    expect(header.grid.axes.map((a) => [a.name, a.size])).toEqual([
      ['y', 2],
      ['x', 3],
    ]);
    expect(Array.from(steps[0]!.fields.u!)).toEqual([10, 11, 12, 20, 21, 22]);
  });

  it('builds a 3D grid [z, y, x]', async () => {
    let text = 'step,time,z,y,x,u\n';
    for (const z of [0, 1])
      for (const y of [0, 1]) for (const x of [0, 1, 2]) text += `5,0.5,${z},${y},${x},${100 * z + 10 * y + x}\n`;
    const { header, steps } = await readAll({ path: write('3d.csv', text) });
    expect(header.grid.axes.map((a) => a.size)).toEqual([2, 2, 3]);
    expect(Array.from(steps[0]!.fields.u!)).toEqual([0, 1, 2, 10, 11, 12, 100, 101, 102, 110, 111, 112]);
  });

  it('accepts a UTF-8 BOM, CRLF line ends, comment lines and quoted fields', async () => {
    const text =
      '\ufeff# written by the Tidewater model, run 7\r\n"step","time","x","salinity"\r\n' +
      '0,0,0.25,"1.5"\r\n0,0,0.75,2.5\r\n\r\n1,0.5,0.25,1.75\r\n1,0.5,0.75,2.25\r\n';
    const { header, steps } = await readAll({ path: write('bom.csv', text) });
    expect(header.variables.map((v) => v.name)).toEqual(['salinity']);
    expect(steps.map((s) => Array.from(s.fields.salinity!))).toEqual([
      [1.5, 2.5],
      [1.75, 2.25],
    ]);
  });

  it('passes NaN and infinities through as values', async () => {
    const text = 'step,time,x,u\n0,0,1,NaN\n0,0,2,nan\n0,0,3,Inf\n0,0,4,-inf\n0,0,5,Infinity\n0,0,6,1.5\n';
    const { header, steps } = await readAll({ path: write('nan.csv', text) });
    expect(Array.from(steps[0]!.fields.u!)).toEqual([NaN, NaN, Infinity, -Infinity, Infinity, 1.5]);
    expect(header.variables[0]!.precision).toEqual({ kind: 'decimal', significantDigits: 2 });
  });

  it('reports the largest number of significant digits per variable and step', async () => {
    const text = 'step,time,x,a,b\n0,0,1,0.12500,1.5e-3\n0,0,2,0.5,0\n1,1,1,0.1,2\n1,1,2,0.25,3.14159\n';
    const { header, steps } = await readAll({ path: write('digits.csv', text) });
    expect(header.variables.map((v) => v.precision)).toEqual([
      { kind: 'decimal', significantDigits: 5 },
      { kind: 'decimal', significantDigits: 2 },
    ]);
    expect(steps.map((s) => s.significantDigits)).toEqual([
      { a: 5, b: 2 },
      { a: 2, b: 6 },
    ]);
  });

  it('takes 17 digits as the precision of a variable without a finite value in the first step', async () => {
    const { header } = await readAll({ path: write('allnan.csv', 'step,time,x,u\n0,0,1,NaN\n') });
    expect(header.variables[0]!.precision).toEqual({ kind: 'decimal', significantDigits: 17 });
    expect(header.notes).toEqual([
      'variable "u" has no finite value in the first step; its precision is taken as 17 significant digits',
    ]);
  });

  it('reads semicolon-separated files with a decimal comma', async () => {
    const text = 'step;time;x;u\r\n0;0;0,5;1,25\r\n0;0;1,5;-2,5e-1\r\n';
    const { header, steps } = await readAll({ path: write('semi.csv', text) });
    expect(header.text).toEqual({ delimiter: ';', decimalMark: ',' });
    expect(header.grid.axes[0]!.coordinates).toEqual(Float64Array.of(0.5, 1.5));
    expect(Array.from(steps[0]!.fields.u!)).toEqual([1.25, -0.25]);
  });

  it('reads tab-separated files', async () => {
    const { steps } = await readAll({ path: write('tab.tsv', 'step\ttime\tx\tu\n0\t0\t1\t2\n0\t0\t2\t3\n') });
    expect(Array.from(steps[0]!.fields.u!)).toEqual([2, 3]);
  });

  it('takes column names and the variable list from the manifest, without regard to case', async () => {
    const text = 'N,T,Lon,salinity,temperature,flag\n0,0,10,35,4,1\n0,0,20,34,5,0\n';
    const { header, steps } = await readAll({
      path: write('named.csv', text),
      manifest: {
        columns: { step: 'n', time: 't', x: 'lon' },
        variables: ['Temperature'],
        variableOptions: { temperature: { bounds: { lower: -2 } }, oxygen: { conservative: false } },
      },
    });
    expect(header.grid.axes[0]!.name).toBe('Lon');
    expect(header.variables).toEqual([
      { name: 'temperature', precision: { kind: 'decimal', significantDigits: 1 }, options: { bounds: { lower: -2 } } },
    ]);
    expect(Object.keys(steps[0]!.fields)).toEqual(['temperature']);
    expect(header.notes).toEqual(['manifest variableOptions names "oxygen", which is not a variable of the file']);
  });

  it('reads files without a time column, giving NaN times', async () => {
    const { steps } = await readAll({ path: write('notime.csv', 'step,x,u\n3,1,2\n4,1,5\n') });
    expect(steps.map((s) => [s.index, s.time])).toEqual([
      [3, NaN],
      [4, NaN],
    ]);
  });

  it('reads gzip-compressed CSV as a stream', async () => {
    const text = longCsv(50, 4);
    const { header, steps } = await readAll({ path: write('run.csv.gz', gzipSync(text)) });
    expect(header.compression).toBe('gzip');
    expect(steps).toHaveLength(4);
    expect(steps[3]!.fields.u![49]).toBeCloseTo(3 + 4.9, 12);
  });

  it('hands out the good steps before the error in a later one', async () => {
    const text = longCsv(5, 3) + '30,15,0.1,oops\n';
    const { error, steps } = await readUntilError({ path: write('late.csv', text) });
    expect(steps.map((s) => s.index)).toEqual([0, 10, 20]);
    expect(error.message).toBe(
      'Line 17, column 4 ("u"): "oops" is not a number; expected a decimal number such as 0.125, -3, 1.5e-3, NaN or Inf.',
    );
  });

  it('stops reading when closed early', async () => {
    const { openSnapshots } = await import('@/src/ingest');
    const reader = await openSnapshots({ path: write('big.csv', longCsv(200, 50)) });
    const seen: number[] = [];
    for await (const step of reader.steps) {
      seen.push(step.index);
      if (seen.length === 2) break;
    }
    await reader.close();
    await reader.close();
    expect(seen).toEqual([0, 10]);
  });
});
