import 'server-only';
import {
  isReadError,
  openSnapshots,
  withTempFile,
  type IngestLimits,
  type IngestManifest,
  type SnapshotReader,
} from '@/src/ingest';
import { ingestLimitsFromEnv } from '@/src/ingest/limits';
import { ingestManifestSchema } from '@/src/ingest/manifest';
import type { Upload } from '@/db/schema';
import { AppError } from '../errors';
import { getObjectStream } from '../storage';

let limits: Partial<IngestLimits> | undefined;

/** The readers' limits as this deployment's environment sets them (read once). */
export function configuredIngestLimits(): Partial<IngestLimits> {
  limits ??= ingestLimitsFromEnv(process.env);
  return limits;
}

/**
 * Opens a stored upload through the readers: copies the object to a private temp file (HDF5
 * needs random access), opens it, runs `fn`, and always closes the reader and removes the file.
 */
export async function withStoredSnapshots<T>(
  upload: Pick<Upload, 'objectKey' | 'fileName' | 'format'>,
  manifest: unknown,
  fn: (reader: SnapshotReader) => Promise<T>,
): Promise<T> {
  const parsedManifest = ingestManifestSchema.safeParse(manifest ?? {});
  const ingestManifest: IngestManifest | undefined = parsedManifest.success ? parsedManifest.data : undefined;
  const stream = await getObjectStream(upload.objectKey);
  return withTempFile(
    stream,
    async (path) => {
      const reader = await openSnapshots({
        limits: configuredIngestLimits(),
        path,
        fileName: upload.fileName,
        declaredFormat: upload.format ?? undefined,
        manifest: ingestManifest,
      });
      try {
        return await fn(reader);
      } finally {
        await reader.close();
      }
    },
    { fileName: upload.fileName },
  );
}

/** Turns a reader's complaint into the 4xx it is; anything else stays an internal error. */
export function readErrorToAppError(err: unknown): unknown {
  if (!isReadError(err)) return err;
  const details = err.where ? { where: err.where } : undefined;
  return new AppError(err.code === 'limit' ? 'too_large:upload' : 'invalid:upload', err.message, details);
}
