import { createWriteStream } from 'node:fs';
import { mkdtemp, rm } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { Transform, type Readable, type TransformCallback } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import { formatBytes } from './limits';
import { ReadError } from './types';

export interface TempFileOptions {
  /** Stop copying and throw a ReadError (code `limit`) once the stream exceeds this. */
  maxBytes?: number;
  /** Parent directory of the private temp directory; defaults to os.tmpdir(). */
  tmpDir?: string;
  /**
   * Name of the file inside the private directory. Only the base name is used, so a name from
   * an upload cannot point outside the directory.
   */
  fileName?: string;
}

/**
 * Writes `stream` to a file in a fresh private directory under the temp dir, runs `fn(path)`
 * and removes the directory afterwards, whether `fn` resolved, threw, or the copy failed.
 * HDF5 needs random access, so the worker copies each object from storage to local disk first.
 */
export async function withTempFile<T>(
  stream: Readable,
  fn: (filePath: string) => Promise<T>,
  options: TempFileOptions = {},
): Promise<T> {
  const dir = await mkdtemp(path.join(options.tmpDir ?? os.tmpdir(), 'varigate-'));
  try {
    const filePath = path.join(dir, safeBaseName(options.fileName));
    const sink = createWriteStream(filePath, { flags: 'wx' });
    if (options.maxBytes === undefined) {
      await pipeline(stream, sink);
    } else {
      await pipeline(stream, byteLimit(options.maxBytes), sink);
    }
    return await fn(filePath);
  } finally {
    // The source may still be open when the copy failed half-way; release it as well.
    if (!stream.destroyed) stream.destroy();
    await rm(dir, { recursive: true, force: true });
  }
}

function safeBaseName(fileName: string | undefined): string {
  const base = fileName ? path.basename(fileName).replace(/[^\w.-]/g, '_') : '';
  return base === '' || base === '.' || base === '..' ? 'upload' : base.slice(-120);
}

/** Passes bytes through and fails once more than `maxBytes` have gone by. */
export function byteLimit(maxBytes: number, what = 'The upload'): Transform {
  let seen = 0;
  return new Transform({
    transform(chunk: Buffer, _encoding: BufferEncoding, callback: TransformCallback) {
      seen += chunk.length;
      if (seen > maxBytes) {
        callback(
          new ReadError(
            `${what} is larger than the limit of ${formatBytes(maxBytes)} (${maxBytes} bytes).`,
            `byte ${maxBytes}`,
            'limit',
          ),
        );
        return;
      }
      callback(null, chunk);
    },
  });
}
