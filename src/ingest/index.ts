import { open, stat } from 'node:fs/promises';
import path from 'node:path';
import { openCsv } from './csv-reader';
import { detectContainer, hasHdf5Signature, hdf5SignatureOffsets } from './detect';
import { openHdf5 } from './hdf5';
import { formatBytes, resolveIngestLimits, type IngestLimits } from './limits';
import type { IngestManifest } from './manifest';
import { ReadError, type SnapshotReader } from './types';

export type {
  CsvDelimiter,
  ReadErrorCode,
  SnapshotFormat,
  SnapshotHeader,
  SnapshotLayout,
  SnapshotReader,
  SnapshotStep,
  SnapshotVariable,
} from './types';
export { ReadError, isReadError } from './types';
export {
  DEFAULT_INGEST_LIMITS,
  INGEST_LIMIT_ENV,
  ingestLimitsSchema,
  resolveIngestLimits,
  type IngestLimits,
} from './limits';
export { ingestManifestSchema, snapshotLayoutSchema, variableOptionsSchema, type IngestManifest } from './manifest';
export { withTempFile, type TempFileOptions } from './temp-file';

export interface OpenSnapshotsInput {
  /** Local path of the upload (the worker copies it from storage first: see withTempFile). */
  path: string;
  /**
   * Original file name, used as a hint when the bytes do not say what the file is; defaults to
   * the base name of `path`.
   */
  fileName?: string;
  /** Format the uploader declared (`csv`, `hdf5`, `netcdf`, a MIME type ...), also a hint. */
  declaredFormat?: string;
  manifest?: IngestManifest;
  limits?: Partial<IngestLimits>;
}

/** Bytes looked at to recognise the format. */
const HEAD_BYTES = 4096;

/**
 * Opens an upload and returns its header and a lazy sequence of steps. Problems with the input
 * are thrown as ReadError, here or while iterating the steps; anything else is a defect.
 * Always call `close()` (in a finally) once done, including after an error while iterating.
 */
export async function openSnapshots(input: OpenSnapshotsInput): Promise<SnapshotReader> {
  const limits = resolveIngestLimits(input.limits);
  const { size } = await stat(input.path);
  if (size === 0) {
    throw new ReadError('The file is empty (0 bytes).', 'file', 'empty');
  }
  if (size > limits.maxFileBytes) {
    throw new ReadError(
      `The file is ${formatBytes(size)} (${size} bytes), over the limit of ` +
        `${formatBytes(limits.maxFileBytes)} per upload.`,
      'file',
      'limit',
    );
  }
  const { head, signatureOffset } = await readSignatures(input.path, size);
  const container = detectContainer({
    head,
    hdf5SignatureOffset: signatureOffset,
    ...(input.declaredFormat !== undefined ? { declaredFormat: input.declaredFormat } : {}),
    // Without an original name, the local file's own name is the best hint there is.
    fileName: input.fileName ?? path.basename(input.path),
  });
  const manifest = withDeclaredLayout(input.manifest, input.declaredFormat);
  if (container === 'hdf5') {
    return openHdf5({
      filePath: input.path,
      fileSize: size,
      signatureOffset: signatureOffset ?? 0,
      limits,
      ...(manifest ? { manifest } : {}),
    });
  }
  return openCsv({
    filePath: input.path,
    fileSize: size,
    gzip: container === 'csv-gzip',
    limits,
    ...(manifest ? { manifest } : {}),
  });
}

/** A declared `csv-long` / `csv-wide` says the layout when the manifest does not. */
function withDeclaredLayout(
  manifest: IngestManifest | undefined,
  declaredFormat: string | undefined,
): IngestManifest | undefined {
  if (manifest?.layout !== undefined) return manifest;
  const declared = declaredFormat?.trim().toLowerCase();
  if (declared === 'csv-long') return { ...manifest, layout: 'long' };
  if (declared === 'csv-wide') return { ...manifest, layout: 'wide' };
  return manifest;
}

/** The first bytes, and the offset of the HDF5 signature if one sits where HDF5 allows it. */
async function readSignatures(
  filePath: string,
  size: number,
): Promise<{ head: Uint8Array; signatureOffset: number | null }> {
  const handle = await open(filePath, 'r');
  try {
    const head = Buffer.alloc(Math.min(HEAD_BYTES, size));
    await handle.read(head, 0, head.length, 0);
    for (const offset of hdf5SignatureOffsets(size)) {
      const probe = Buffer.alloc(8);
      const { bytesRead } = await handle.read(probe, 0, 8, offset);
      if (bytesRead === 8 && hasHdf5Signature(probe)) return { head, signatureOffset: offset };
    }
    return { head, signatureOffset: null };
  } finally {
    await handle.close();
  }
}
