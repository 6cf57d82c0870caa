import { existsSync, readdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { Readable } from 'node:stream';
import { describe, expect, it } from 'vitest';
import { openSnapshots, ReadError, withTempFile } from '@/src/ingest';
import { longCsv, scratchDir } from './helpers';

const { dir: tmpDir } = scratchDir();

/** Nothing of ours may be left in the temp dir after any of these. */
function leftovers(): string[] {
  return readdirSync(tmpDir);
}

function failingStream(after: string): Readable {
  let sent = false;
  return new Readable({
    read() {
      if (!sent) {
        sent = true;
        this.push(after);
      } else {
        this.destroy(new Error('connection reset by storage'));
      }
    },
  });
}

describe('withTempFile', () => {
  it('writes the stream to a file, runs fn on it, then removes it', async () => {
    let seen = '';
    const result = await withTempFile(
      Readable.from([Buffer.from('step,time,'), Buffer.from('x,u\n')]),
      async (file) => {
        seen = file;
        return readFileSync(file, 'utf8');
      },
      { tmpDir },
    );
    expect(result).toBe('step,time,x,u\n');
    expect(existsSync(seen)).toBe(false);
    expect(leftovers()).toEqual([]);
  });

  it('removes the file when fn throws, and passes the error on', async () => {
    let seen = '';
    await expect(
      withTempFile(
        Readable.from(['data']),
        async (file) => {
          seen = file;
          throw new Error('analysis failed');
        },
        { tmpDir },
      ),
    ).rejects.toThrow('analysis failed');
    expect(existsSync(seen)).toBe(false);
    expect(leftovers()).toEqual([]);
  });

  it('removes the partial file when the stream fails, without calling fn', async () => {
    let called = false;
    await expect(
      withTempFile(
        failingStream('partial'),
        async () => {
          called = true;
        },
        { tmpDir },
      ),
    ).rejects.toThrow('connection reset by storage');
    expect(called).toBe(false);
    expect(leftovers()).toEqual([]);
  });

  it('stops copying at maxBytes with a limit ReadError', async () => {
    const big = Readable.from(Array.from({ length: 100 }, () => Buffer.alloc(1024, 0x41)));
    const error = await withTempFile(big, async () => 'read', { tmpDir, maxBytes: 10_000 }).catch((e: unknown) => e);
    expect(error).toBeInstanceOf(ReadError);
    expect((error as ReadError).message).toBe('The upload is larger than the limit of 9.8 KiB (10000 bytes).');
    expect((error as ReadError).code).toBe('limit');
    expect(big.destroyed).toBe(true);
    expect(leftovers()).toEqual([]);
  });

  it('keeps an uploaded name inside its private directory', async () => {
    const where = await withTempFile(Readable.from(['x']), async (file) => file, {
      tmpDir,
      fileName: '../../etc/run 7.csv',
    });
    expect(path.basename(where)).toBe('run_7.csv');
    expect(path.dirname(path.dirname(where))).toBe(tmpDir);
  });

  it('leaves nothing behind when reading the copy fails half-way', async () => {
    const text = longCsv(10, 3) + '30,1.5,0.05,bad\n';
    const error = await withTempFile(
      Readable.from([text]),
      async (file) => {
        const reader = await openSnapshots({ path: file });
        try {
          for await (const step of reader.steps) void step;
        } finally {
          await reader.close();
        }
      },
      { tmpDir },
    ).catch((e: unknown) => e);
    expect(error).toBeInstanceOf(ReadError);
    expect(leftovers()).toEqual([]);
  });
});
