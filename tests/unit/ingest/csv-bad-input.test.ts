import { describe, expect, it } from 'vitest';
import { gzipSync } from 'node:zlib';
import { longCsv, readErrorOf, readUntilError, scratchDir } from './helpers';

/**
 * Every kind of bad CSV gets a ReadError whose message says what is wrong, where, and what was
 * expected. Messages are checked word for word: they are the product's answer to the user.
 */
const { write } = scratchDir();

describe('bad CSV input', () => {
  it('an empty file', async () => {
    const error = await readErrorOf({ path: write('empty.csv', '') });
    expect(error.message).toBe('The file is empty (0 bytes).');
    expect(error.code).toBe('empty');
  });

  it('a file of blank lines', async () => {
    const error = await readErrorOf({ path: write('blank.csv', '\n\r\n  \n') });
    expect(error.message).toBe('The file is empty (no text); expected a CSV header line such as "step,time,x,rho".');
  });

  it('a header and no data', async () => {
    const error = await readErrorOf({ path: write('header.csv', 'step,time,x,rho\n') });
    expect(error.message).toBe(
      'The file has a header (line 1: step,time,x,rho) but no data rows; expected one row per cell and step after it.',
    );
    expect(error.where).toBe('line 1');
    expect(error.code).toBe('empty');
  });

  it('a ragged row, with line number and expected/actual field counts', async () => {
    const error = await readErrorOf({
      path: write('ragged.csv', 'step,time,x,rho\n0,0,1,2\n0,0,2\n'),
    });
    expect(error.message).toBe('Line 3 has 3 fields but the header has 4 (step, time, x, rho).');
    expect(error.where).toBe('line 3');
    expect(error.code).toBe('syntax');
  });

  it('a decimal comma in a comma-separated file is caught as a ragged row, never read as two columns', async () => {
    const error = await readErrorOf({
      path: write('comma.csv', 'step,time,x,rho\n0,0,1,2\n0,0,2,1,5\n'),
    });
    expect(error.message).toBe(
      'Line 3 has 5 fields but the header has 4 (step, time, x, rho). A decimal comma inside a ' +
        'comma-separated file splits a number in two: write "." as the decimal mark, or separate fields with ";".',
    );
  });

  it('semicolons with decimal commas mixed with a comma-separated header are refused', async () => {
    const error = await readErrorOf({
      path: write('mixed.csv', 'step,time,x,rho\n0;0;0,5;1,5\n'),
    });
    expect(error.message).toBe('Line 2 has 3 fields but the header has 4 (step, time, x, rho).');
  });

  it('a non-numeric cell, with line, column and the text found', async () => {
    const error = await readErrorOf({
      path: write('text.csv', 'step,time,x,rho\n0,0,1,2\n0,0,2,abc\n'),
    });
    expect(error.message).toBe(
      'Line 3, column 4 ("rho"): "abc" is not a number; expected a decimal number such as 0.125, -3, 1.5e-3, NaN or Inf.',
    );
    expect(error.where).toBe('line 3, column 4');
    expect(error.code).toBe('value');
  });

  it('an empty cell', async () => {
    const error = await readErrorOf({ path: write('hole.csv', 'step,time,x,rho\n0,0,1,\n') });
    expect(error.message).toBe('Line 2, column 4 ("rho") is empty; expected a number (write NaN for a missing value).');
  });

  it('a step number that is not an integer', async () => {
    const error = await readErrorOf({ path: write('step.csv', 'step,time,x,rho\n1.5,0,1,2\n') });
    expect(error.message).toBe(
      'Line 2, column 1 ("step"): step number "1.5" is not an integer; expected a whole number such as 0, 10, 200.',
    );
  });

  it('a non-finite coordinate', async () => {
    const error = await readErrorOf({ path: write('coord.csv', 'step,time,x,rho\n0,0,nan,2\n') });
    expect(error.message).toBe(
      'Line 2, column 3 ("x"): coordinate "nan" is not finite; coordinates must be finite numbers.',
    );
  });

  it('decreasing step numbers', async () => {
    const text = 'step,time,x,rho\n10,1,1,2\n10,1,2,2\n5,0.5,1,2\n5,0.5,2,2\n';
    const { error, steps } = await readUntilError({ path: write('decreasing.csv', text) });
    expect(steps.map((s) => s.index)).toEqual([10]);
    expect(error.message).toBe(
      'Line 4: step 5 comes after step 10; step numbers must strictly increase, with all rows of a ' +
        'step in one block (a step number may appear in one block only).',
    );
    expect(error.code).toBe('steps');
  });

  it('a step number repeated in a later block', async () => {
    const text = 'step,time,x,rho\n0,0,1,2\n0,0,2,2\n1,1,1,2\n1,1,2,2\n0,0,1,2\n0,0,2,2\n';
    const error = await readErrorOf({ path: write('again.csv', text) });
    expect(error.message).toBe(
      'Line 6: step 0 comes after step 1; step numbers must strictly increase, with all rows of a ' +
        'step in one block (a step number may appear in one block only).',
    );
  });

  it('a step block written twice in a row', async () => {
    const text = 'step,time,x,rho\n0,0,1,2\n0,0,2,2\n1,1,1,2\n1,1,2,2\n1,1,1,2\n1,1,2,2\n';
    const error = await readErrorOf({ path: write('twice.csv', text) });
    expect(error.message).toBe(
      'Line 6: cell (x=1) appears twice in step 1; each step must list each cell once (a repeated step number also causes this).',
    );
    expect(error.code).toBe('grid');
  });

  it('a cell twice in the first step', async () => {
    const error = await readErrorOf({ path: write('dupfirst.csv', 'step,time,x,rho\n0,0,1,2\n0,0,2,2\n0,0,1,3\n') });
    expect(error.message).toBe(
      'Line 4: cell (x=1) appears twice in the first step (step 0); each step must list each cell once (a repeated step number also causes this).',
    );
  });

  it('a step with fewer cells than the first', async () => {
    const text = longCsv(4, 1) + '10,0.5,0.125,1\n10,0.5,0.375,1\n10,0.5,0.625,1\n';
    const { error, steps } = await readUntilError({ path: write('short.csv', text) });
    expect(steps).toHaveLength(1);
    expect(error.message).toBe(
      'Step 10 (lines 6-8) has 3 rows, but the first step has 4 cells; every step must list each cell of the first step once.',
    );
    expect(error.where).toBe('lines 6-8');
  });

  it('a step with a cell the first step does not have', async () => {
    const text = longCsv(2, 1) + '10,0.5,0.25,1\n10,0.5,0.75,1\n10,0.5,1.25,1\n';
    const error = await readErrorOf({ path: write('extra.csv', text) });
    expect(error.message).toBe(
      'Line 6: cell (x=1.25) of step 10 is not a cell of the first step; every step must list the same 2 cells.',
    );
  });

  it('a 2D first step that does not fill its grid', async () => {
    const text = 'step,time,x,y,u\n0,0,0,0,1\n0,0,1,0,1\n0,0,0,1,1\n';
    const error = await readErrorOf({ path: write('holes2d.csv', text) });
    expect(error.message).toBe(
      'The first step (step 0, lines 2-4) has 3 rows, but its coordinates take 2 y values, 2 x values, which span 4 cells; ' +
        'a structured grid lists every combination of coordinates exactly once.',
    );
  });

  it('times that differ within a step', async () => {
    const error = await readErrorOf({ path: write('time.csv', 'step,time,x,rho\n0,0,1,2\n0,0.5,2,2\n') });
    expect(error.message).toBe(
      'Line 3, column 2 ("time"): time "0.5" differs from 0 given on line 2 for the same step 0; all rows of a step must carry the same time.',
    );
  });

  it('a missing coordinate column', async () => {
    const error = await readErrorOf({ path: write('nox.csv', 'step,time,rho\n0,0,1\n') });
    expect(error.message).toBe(
      'Line 1 (the header): the long layout needs a coordinate column "x" (then "y" and "z" for 2D and 3D); ' +
        'found "step", "time", "rho". Name it in the manifest (columns.x) if it is called differently.',
    );
    expect(error.code).toBe('layout');
  });

  it('a z column without a y column', async () => {
    const error = await readErrorOf({ path: write('noy.csv', 'step,time,x,z,rho\n0,0,1,1,1\n') });
    expect(error.message).toBe(
      'Line 1 (the header): there is a "z" column but no "y" column; a 3D grid needs "x", "y" and "z".',
    );
  });

  it('a header from which no layout can be told', async () => {
    const error = await readErrorOf({ path: write('what.csv', 'time,x,rho\n0,1,2\n') });
    expect(error.message).toBe(
      'Line 1: cannot tell the layout from the header ("time", "x", "rho"). The long layout needs a "step" column, ' +
        'a "time" column and coordinate columns ("x"[, "y"[, "z"]]); the wide layout needs a coordinate column ' +
        'followed by one column per step headed by its time or "step=<n>". Other column names can be given in ' +
        'the manifest (columns.step, columns.time, columns.x ...).',
    );
  });

  it('repeated and empty column names', async () => {
    expect((await readErrorOf({ path: write('rep.csv', 'step,time,x,u,U\n0,0,1,2,3\n') })).message).toBe(
      'Line 1 (the header): column 5 repeats the name "U" of column 4; column names must be unique.',
    );
    expect((await readErrorOf({ path: write('noname.csv', 'step,time,x,,u\n0,0,1,2,3\n') })).message).toBe(
      'Line 1 (the header): column 4 has no name; every column needs one.',
    );
  });

  it('a variable named in the manifest that the file lacks', async () => {
    const error = await readErrorOf({
      path: write('var.csv', 'step,time,x,u\n0,0,1,2\n'),
      manifest: { variables: ['rho'] },
    });
    expect(error.message).toBe(
      'The manifest names variable "rho", which is not a variable column of the header on line 1 ("step", "time", "x", "u").',
    );
  });

  it('a file over the size limit', async () => {
    const error = await readErrorOf({ path: write('big.csv', longCsv(10, 10)), limits: { maxFileBytes: 1000 } });
    expect(error.message).toMatch(
      /^The file is \d+(\.\d)? KiB \(\d+ bytes\), over the limit of 1000 bytes per upload\.$/,
    );
    expect(error.code).toBe('limit');
  });

  it('more cells than the per-step limit', async () => {
    const error = await readErrorOf({ path: write('cells.csv', longCsv(20, 2)), limits: { maxCellsPerStep: 10 } });
    expect(error.message).toBe(
      'Line 12: the first step has more than 10 rows (cells); the limit is 10 cells per step.',
    );
    expect(error.code).toBe('limit');
  });

  it('more steps than the limit', async () => {
    const { error, steps } = await readUntilError({ path: write('steps.csv', longCsv(2, 4)), limits: { maxSteps: 3 } });
    expect(steps).toHaveLength(3);
    expect(error.message).toBe('Line 8: step 30 is step number 4 of the file; the limit is 3 steps per file.');
  });

  it('more variables than the limit', async () => {
    const error = await readErrorOf({
      path: write('vars.csv', 'step,time,x,a,b,c\n0,0,1,1,2,3\n'),
      limits: { maxVariables: 2 },
    });
    expect(error.message).toBe(
      'The file has 3 variables; the limit is 2 per file. Name the ones to check in the manifest (variables).',
    );
  });

  it('a header line over the limit', async () => {
    const names = Array.from({ length: 100 }, (_, i) => `variable_${i}`).join(',');
    const error = await readErrorOf({
      path: write('wide-header.csv', `step,time,x,${names}\n`),
      limits: { maxHeaderBytes: 256 },
    });
    expect(error.message).toBe('Line 1 (the header) is 1.2 KiB long, over the limit of 256 bytes for a header line.');
    const noBreaks = await readErrorOf({
      path: write('one-line.csv', 'x,'.repeat(5000)),
      limits: { maxHeaderBytes: 256 },
    });
    expect(noBreaks.message).toBe(
      'Line 1 (the header) is longer than 256 bytes, or the file has no line breaks. Expected a header line such as "step,time,x,rho".',
    );
  });

  it('a truncated gzip stream', async () => {
    const gz = gzipSync(longCsv(200, 20));
    const { error, steps } = await readUntilError({ path: write('cut.csv.gz', gz.subarray(0, gz.length - 200)) });
    expect(steps.length).toBeLessThan(20);
    expect(error.message).toMatch(
      /^The gzip data is damaged or cut off \(zlib: unexpected end of file\)( after .*)?; upload the complete file\.$/,
    );
    expect(error.code).toBe('truncated');
  });

  it('gzip that expands past the text limit', async () => {
    const gz = gzipSync(longCsv(100, 20));
    const error = await readErrorOf({ path: write('bomb.csv.gz', gz), limits: { maxUncompressedBytes: 20_000 } });
    expect(error.message).toBe(
      'The uncompressed text of the upload is larger than the limit of 19.5 KiB (20000 bytes).',
    );
    expect(error.code).toBe('limit');
  });

  it('binary data and UTF-16 text', async () => {
    expect((await readErrorOf({ path: write('nul.csv', 'step,time\0,x\n') })).message).toBe(
      'The file is not text: byte 9 is a NUL byte (it begins with bytes 73 74 65 70 2c 74 69 6d ("step,tim")). Expected a UTF-8 CSV.',
    );
    const utf16 = Buffer.concat([Buffer.from([0xff, 0xfe]), Buffer.from('step,time,x,u\n', 'utf16le')]);
    expect((await readErrorOf({ path: write('utf16.csv', utf16) })).message).toBe(
      'The file is UTF-16 text (it starts with a UTF-16 byte-order mark); save the CSV as UTF-8.',
    );
  });

  it('an HDF5 file inside gzip', async () => {
    const fake = Buffer.concat([Buffer.from([0x89, 0x48, 0x44, 0x46, 0x0d, 0x0a, 0x1a, 0x0a]), Buffer.alloc(100)]);
    const error = await readErrorOf({ path: write('data.h5.gz', gzipSync(fake)) });
    expect(error.message).toBe(
      'The gzip-compressed content is HDF5 inside gzip. HDF5 needs random access and is not read from gzip; ' +
        'upload the .h5 file itself (HDF5 compresses datasets internally with deflate).',
    );
  });
});
