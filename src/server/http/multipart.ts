import 'server-only';
import { createHash, randomUUID } from 'node:crypto';
import { createWriteStream } from 'node:fs';
import { rm } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { Readable } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import { Transform } from 'node:stream';
import busboy from 'busboy';
import { AppError } from '../errors';

export interface SpooledFile {
  path: string;
  fileName: string;
  contentType: string;
  size: number;
  sha256: string;
}

export interface MultipartUpload {
  fields: Record<string, string>;
  file?: SpooledFile;
  /** Removes the spooled file; call it in a finally block. */
  cleanup: () => Promise<void>;
}

/**
 * Reads a multipart/form-data body without holding the file in memory: text fields are
 * collected, the one file part is written to a temporary file while its SHA-256 is computed.
 * The file is spooled rather than streamed straight to S3 because a plain S3 PUT needs the
 * length up front, which a multipart part does not announce.
 */
export async function readMultipartUpload(
  request: Request,
  { maxBytes }: { maxBytes: number },
): Promise<MultipartUpload> {
  const contentType = request.headers.get('content-type') ?? '';
  if (!contentType.toLowerCase().startsWith('multipart/form-data')) {
    throw new AppError(
      'invalid:upload',
      'Expected multipart/form-data with a `file` part, or JSON with an `objectKey`.',
    );
  }
  if (!request.body) throw new AppError('invalid:upload', 'The request has no body.');

  const fields: Record<string, string> = {};
  let file: SpooledFile | undefined;
  const tempPaths: string[] = [];
  const cleanup = async () => {
    await Promise.all(tempPaths.map((p) => rm(p, { force: true })));
  };

  const parser = busboy({
    headers: { 'content-type': contentType },
    limits: { files: 1, fields: 50, fieldSize: 256 * 1024, fileSize: maxBytes },
  });
  const pendingFiles: Promise<void>[] = [];
  let tooLarge = false;
  let extraFile = false;

  parser.on('field', (name, value) => {
    fields[name] = value;
  });
  parser.on('file', (name, stream, info) => {
    if (name !== 'file' || file) {
      extraFile = true;
      stream.resume();
      return;
    }
    const target = path.join(os.tmpdir(), `varigate-upload-${randomUUID()}`);
    tempPaths.push(target);
    const hash = createHash('sha256');
    let size = 0;
    const meter = new Transform({
      transform(chunk: Buffer, _enc, cb) {
        hash.update(chunk);
        size += chunk.length;
        cb(null, chunk);
      },
    });
    stream.on('limit', () => {
      tooLarge = true;
    });
    const spooled: SpooledFile = {
      path: target,
      fileName: info.filename || 'upload',
      contentType: info.mimeType,
      size: 0,
      sha256: '',
    };
    file = spooled;
    pendingFiles.push(
      pipeline(stream, meter, createWriteStream(target)).then(() => {
        spooled.size = size;
        spooled.sha256 = hash.digest('hex');
      }),
    );
  });

  try {
    await pipeline(Readable.fromWeb(request.body as import('node:stream/web').ReadableStream), parser);
    await Promise.all(pendingFiles);
  } catch (err) {
    await cleanup();
    if (err instanceof AppError) throw err;
    throw new AppError('invalid:upload', `Could not read the multipart body: ${(err as Error).message}`);
  }
  if (tooLarge) {
    await cleanup();
    throw new AppError(
      'too_large:upload',
      `The file is larger than ${maxBytes} bytes, the limit for uploads through the app; use POST /api/v1/uploads for a presigned URL.`,
    );
  }
  if (extraFile) {
    await cleanup();
    throw new AppError('invalid:upload', 'Send exactly one file, in the part named `file`.');
  }
  return { fields, file, cleanup };
}
