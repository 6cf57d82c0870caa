import { createReadStream } from 'node:fs';
import { open } from 'node:fs/promises';
import { pipeline, type Readable } from 'node:stream';
import { createGunzip } from 'node:zlib';
import Papa from 'papaparse';
import { describeBytes, hasHdf5Signature } from './detect';
import { formatBytes, type IngestLimits } from './limits';
import { byteLimit } from './temp-file';
import { ReadError, type CsvDelimiter } from './types';

/**
 * The byte and row plumbing under both CSV layouts: opening the (possibly gzip-compressed)
 * text, looking at its first line before parsing, and turning the stream into batches of rows
 * with papaparse, pulled by the reader so that a slow consumer stops the file from being read.
 */

/** Bytes read from the stream per chunk; papaparse parses one chunk per call. */
const CHUNK_BYTES = 64 * 1024;

export interface TextHead {
  /** Decoded text of the first bytes (BOM removed), enough to hold the header line. */
  text: string;
  /** True when `text` is the whole file. */
  complete: boolean;
}

/**
 * Reads the start of the text (through gunzip when `gzip`), checks that it is UTF-8 text and
 * not something else in disguise, and returns it decoded.
 */
export async function readTextHead(filePath: string, gzip: boolean, limits: IngestLimits): Promise<TextHead> {
  const want = limits.maxHeaderBytes + 4096;
  const { bytes, complete } = gzip ? await readGunzippedHead(filePath, want) : await readPlainHead(filePath, want);
  checkTextBytes(bytes, gzip);
  const text = new TextDecoder('utf-8').decode(bytes);
  return { text: text.charCodeAt(0) === 0xfeff ? text.slice(1) : text, complete };
}

async function readPlainHead(filePath: string, want: number) {
  const handle = await open(filePath, 'r');
  try {
    const buffer = Buffer.alloc(want);
    const { bytesRead } = await handle.read(buffer, 0, want, 0);
    return { bytes: buffer.subarray(0, bytesRead), complete: bytesRead < want };
  } finally {
    await handle.close();
  }
}

function readGunzippedHead(filePath: string, want: number): Promise<{ bytes: Buffer; complete: boolean }> {
  return new Promise((resolve, reject) => {
    const parts: Buffer[] = [];
    let length = 0;
    let settled = false;
    const gunzip = pipeline(createReadStream(filePath), createGunzip(), () => undefined);
    const finish = (complete: boolean) => {
      if (settled) return;
      settled = true;
      gunzip.destroy();
      resolve({ bytes: Buffer.concat(parts).subarray(0, want), complete });
    };
    gunzip.on('data', (chunk: Buffer) => {
      parts.push(chunk);
      length += chunk.length;
      if (length >= want) finish(false);
    });
    gunzip.on('end', () => finish(true));
    gunzip.on('error', (error: Error) => {
      if (settled) return;
      settled = true;
      reject(gzipError(error, length));
    });
  });
}

/** Refuses bytes that are not UTF-8 text before papaparse turns them into odd columns. */
function checkTextBytes(bytes: Uint8Array, gzip: boolean): void {
  const inside = gzip ? 'The gzip-compressed content' : 'The file';
  if (hasHdf5Signature(bytes)) {
    throw new ReadError(
      `${inside} is HDF5 inside gzip. HDF5 needs random access and is not read from gzip; ` +
        'upload the .h5 file itself (HDF5 compresses datasets internally with deflate).',
      'byte 0',
      'unsupported',
    );
  }
  if ((bytes[0] === 0xff && bytes[1] === 0xfe) || (bytes[0] === 0xfe && bytes[1] === 0xff)) {
    throw new ReadError(
      `${inside} is UTF-16 text (it starts with a UTF-16 byte-order mark); save the CSV as UTF-8.`,
      'byte 0',
      'encoding',
    );
  }
  const nul = bytes.indexOf(0);
  if (nul >= 0) {
    throw new ReadError(
      `${inside} is not text: byte ${nul} is a NUL byte (it begins with ${describeBytes(bytes)}). ` +
        'Expected a UTF-8 CSV.',
      `byte ${nul}`,
      'encoding',
    );
  }
}

/** Wraps zlib's terse errors into a message about the upload. */
export function gzipError(error: unknown, textBytesSoFar?: number): ReadError {
  const detail = error instanceof Error ? error.message : String(error);
  const after = textBytesSoFar === undefined ? '' : ` after ${formatBytes(textBytesSoFar)} of text`;
  return new ReadError(
    `The gzip data is damaged or cut off (zlib: ${detail})${after}; upload the complete file.`,
    'gzip stream',
    'truncated',
  );
}

/**
 * The text stream of the file: raw bytes, or gunzipped bytes with a bound on how much text
 * they may expand to. `maxTextBytes` bounds the plain file too when given (wide layout).
 */
export function openTextStream(filePath: string, gzip: boolean, maxTextBytes: number, tooLargeWhat: string): Readable {
  const file = createReadStream(filePath, { highWaterMark: CHUNK_BYTES });
  if (!gzip) {
    if (!Number.isFinite(maxTextBytes)) return file;
    return pipeline(file, byteLimit(maxTextBytes, tooLargeWhat), () => undefined);
  }
  let seen = 0;
  const gunzip = createGunzip({ chunkSize: CHUNK_BYTES });
  gunzip.on('data', (chunk: Buffer) => {
    seen += chunk.length;
  });
  const limited = byteLimit(maxTextBytes, tooLargeWhat);
  // zlib errors surface on the last stream of the pipeline; tag them so they read as upload
  // problems rather than as internal failures.
  gunzip.on('error', (error: Error & { code?: string }) => {
    if (typeof error.code === 'string' && error.code.startsWith('Z_')) {
      limited.destroy(gzipError(error, seen));
    }
  });
  return pipeline(file, gunzip, limited, () => undefined);
}

/** Picks the separator from the header line: the most frequent of `,` `;` tab outside quotes. */
export function chooseDelimiter(headerLine: string): CsvDelimiter {
  let commas = 0;
  let semicolons = 0;
  let tabs = 0;
  let quoted = false;
  for (let i = 0; i < headerLine.length; i++) {
    const c = headerLine[i];
    if (c === '"') quoted = !quoted;
    else if (quoted) continue;
    else if (c === ',') commas++;
    else if (c === ';') semicolons++;
    else if (c === '\t') tabs++;
  }
  if (semicolons > commas && semicolons >= tabs) return ';';
  if (tabs > commas && tabs > semicolons) return '\t';
  return ',';
}

/** Splits a header line into trimmed names, honouring double quotes. */
export function splitHeaderLine(line: string, delimiter: CsvDelimiter): string[] {
  const parsed = Papa.parse<string[]>(line, { delimiter, newline: '\n', quoteChar: '"' });
  const row = parsed.data[0] ?? [];
  return row.map((name) => name.trim());
}

export interface HeaderLine {
  /** 1-based line number of the header. */
  line: number;
  text: string;
}

/**
 * Finds the header: the first line that is neither blank nor a `#` comment. Solvers often
 * prefix their CSV with comment lines naming the run; those are skipped, not parsed.
 */
export function findHeaderLine(head: TextHead, limits: IngestLimits): HeaderLine | null {
  const { text } = head;
  const newline = text.includes('\n') ? '\n' : '\r';
  let start = 0;
  let line = 1;
  while (start < text.length) {
    let end = text.indexOf(newline, start);
    if (end < 0) {
      if (!head.complete) {
        throw new ReadError(
          `Line ${line} (the header) is longer than ${formatBytes(limits.maxHeaderBytes)}, or ` +
            'the file has no line breaks. Expected a header line such as "step,time,x,rho".',
          `line ${line}`,
          'limit',
        );
      }
      end = text.length;
    }
    const raw = text.slice(start, end).replace(/\r$/, '');
    if (raw.trim() !== '' && !raw.trimStart().startsWith('#')) {
      const bytes = Buffer.byteLength(raw);
      if (bytes > limits.maxHeaderBytes) {
        throw new ReadError(
          `Line ${line} (the header) is ${formatBytes(bytes)} long, over the limit of ` +
            `${formatBytes(limits.maxHeaderBytes)} for a header line.`,
          `line ${line}`,
          'limit',
        );
      }
      return { line, text: raw };
    }
    start = end + 1;
    line += 1;
  }
  return null;
}

export interface RowBatch {
  rows: string[][];
  /** Line number of rows[0] (1-based, counting every line of the file). */
  firstLine: number;
}

/**
 * Streams `input` through papaparse and yields its rows in batches (one batch per chunk of
 * text). Fast mode is forced: fields are split on the separator and lines on `newline` only,
 * so a stray quote can never make papaparse swallow the rest of the file into one field, and
 * line numbers stay exact. Quoted numbers keep their quotes and are unquoted by the number
 * scanner; the header, which may need real quoting, is split separately.
 *
 * Back-pressure: when batches wait to be consumed the source stream is paused, so at most a
 * couple of chunks are held whatever the file size.
 */
export async function* csvRowBatches(
  input: Readable,
  delimiter: CsvDelimiter,
  newline: '\n' | '\r',
  signal?: AbortSignal,
): AsyncGenerator<RowBatch> {
  const queue: string[][][] = [];
  let finished = false;
  let failure: unknown = null;
  let wake: (() => void) | null = null;
  const notify = () => {
    const resolve = wake;
    wake = null;
    resolve?.();
  };
  // A stream that closes without 'end' or 'error' would otherwise leave the reader waiting.
  const onClose = () => {
    if (finished) return;
    finished = true;
    if (!signal?.aborted) failure = new Error('the CSV text stream closed before its end');
    notify();
  };
  const onAbort = () => {
    finished = true;
    input.destroy();
    notify();
  };
  input.on('close', onClose);
  signal?.addEventListener('abort', onAbort, { once: true });
  input.setEncoding('utf8');
  Papa.parse<string[]>(input, {
    delimiter,
    newline,
    fastMode: true,
    header: false,
    dynamicTyping: false,
    skipEmptyLines: false,
    chunk(results) {
      queue.push(results.data);
      if (queue.length >= 2 && !input.isPaused()) input.pause();
      notify();
    },
    complete() {
      finished = true;
      notify();
    },
    error(error: Error) {
      failure = error;
      finished = true;
      notify();
    },
  });

  let line = 1;
  try {
    for (;;) {
      const rows = queue.shift();
      if (rows) {
        if (queue.length === 0 && input.isPaused() && !finished) input.resume();
        const batch: RowBatch = { rows, firstLine: line };
        line += rows.length;
        yield batch;
        continue;
      }
      if (failure !== null) throw asReadError(failure);
      if (finished) return;
      await new Promise<void>((resolve) => {
        wake = resolve;
      });
    }
  } finally {
    signal?.removeEventListener('abort', onAbort);
    input.destroy();
  }
}

/** zlib failures that reached papaparse untagged are still problems of the upload. */
function asReadError(failure: unknown): unknown {
  const code = (failure as { code?: unknown } | null)?.code;
  if (!(failure instanceof ReadError) && typeof code === 'string' && code.startsWith('Z_')) {
    return gzipError(failure);
  }
  return failure;
}

/** A row that holds nothing: an empty line (or just a `\r` left by CRLF). */
export function isBlankRow(row: readonly string[]): boolean {
  if (row.length !== 1) return false;
  const only = row[0] ?? '';
  return only.length === 0 || only.trim() === '';
}

/** A `#` comment line. */
export function isCommentRow(row: readonly string[]): boolean {
  const first = row[0];
  if (first === undefined || first.length === 0) return false;
  const c = first.charCodeAt(0);
  if (c === 35) return true; // '#'
  return (c === 32 || c === 9) && first.trimStart().startsWith('#');
}
