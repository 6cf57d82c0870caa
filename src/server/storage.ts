import 'server-only';
import { Readable } from 'node:stream';
import {
  GetObjectCommand,
  ListObjectsV2Command,
  HeadBucketCommand,
  HeadObjectCommand,
  PutObjectCommand,
  S3Client,
  DeleteObjectCommand,
} from '@aws-sdk/client-s3';
import { getSignedUrl } from '@aws-sdk/s3-request-presigner';
import { env } from './env';

/**
 * Object storage. Uploaded snapshot files live here and nowhere else (no local disk), so any
 * web instance can store and any worker can read.
 */

let client: S3Client | undefined;

export function s3(): S3Client {
  if (client) return client;
  const e = env();
  client = new S3Client({
    region: e.S3_REGION,
    endpoint: e.S3_ENDPOINT,
    forcePathStyle: e.S3_FORCE_PATH_STYLE,
    credentials: { accessKeyId: e.S3_ACCESS_KEY_ID, secretAccessKey: e.S3_SECRET_ACCESS_KEY },
    // The SDK's default flexible checksums send stream bodies with aws-chunked framing, which
    // simple S3 implementations store verbatim (framing inside the object). Only checksum when
    // an operation requires it.
    requestChecksumCalculation: 'WHEN_REQUIRED',
    responseChecksumValidation: 'WHEN_REQUIRED',
  });
  return client;
}

function bucket(): string {
  return env().S3_BUCKET;
}

/** Stores a stream or buffer. A stream needs its exact length (S3 PUT has no chunked mode here). */
export async function putObject(input: {
  key: string;
  body: Buffer | Uint8Array | Readable;
  contentLength?: number;
  contentType?: string;
}): Promise<void> {
  await s3().send(
    new PutObjectCommand({
      Bucket: bucket(),
      Key: input.key,
      Body: input.body,
      ContentLength: input.contentLength,
      ContentType: input.contentType ?? 'application/octet-stream',
    }),
  );
}

/** The object's bytes as a Node stream; the caller consumes or destroys it. */
export async function getObjectStream(key: string): Promise<Readable> {
  const res = await s3().send(new GetObjectCommand({ Bucket: bucket(), Key: key }));
  if (!res.Body) throw new Error(`object ${key} has no body`);
  return res.Body as Readable;
}

export async function headObject(key: string): Promise<{ size: number; contentType?: string } | undefined> {
  try {
    const res = await s3().send(new HeadObjectCommand({ Bucket: bucket(), Key: key }));
    return { size: res.ContentLength ?? 0, contentType: res.ContentType };
  } catch (err) {
    const status = (err as { $metadata?: { httpStatusCode?: number } }).$metadata?.httpStatusCode;
    if (status === 404) return undefined;
    throw err;
  }
}

export async function deleteObject(key: string): Promise<void> {
  await s3().send(new DeleteObjectCommand({ Bucket: bucket(), Key: key }));
}

/** A URL a client can PUT the file to directly, valid for `expiresIn` seconds. */
export async function presignPut(input: { key: string; contentType?: string; expiresIn?: number }): Promise<string> {
  const command = new PutObjectCommand({ Bucket: bucket(), Key: input.key, ContentType: input.contentType });
  return getSignedUrl(s3(), command, { expiresIn: input.expiresIn ?? 900 });
}

/** A URL a browser can GET the raw file from, valid for `expiresIn` seconds. */
export async function presignGet(input: { key: string; fileName?: string; expiresIn?: number }): Promise<string> {
  const command = new GetObjectCommand({
    Bucket: bucket(),
    Key: input.key,
    ResponseContentDisposition: input.fileName
      ? `attachment; filename="${input.fileName.replace(/"/g, '')}"`
      : undefined,
  });
  return getSignedUrl(s3(), command, { expiresIn: input.expiresIn ?? 300 });
}

export async function checkStorage(): Promise<void> {
  await s3().send(new HeadBucketCommand({ Bucket: bucket() }));
}

export interface StoredObjectInfo {
  key: string;
  lastModified: Date;
  size: number;
}

/** Every object under `prefix`, a page (up to 1,000) at a time. */
export async function* listObjects(prefix: string): AsyncGenerator<StoredObjectInfo[]> {
  let token: string | undefined;
  do {
    const res = await s3().send(
      new ListObjectsV2Command({ Bucket: bucket(), Prefix: prefix, ContinuationToken: token }),
    );
    yield (res.Contents ?? []).map((o) => ({
      key: o.Key ?? '',
      lastModified: o.LastModified ?? new Date(0),
      size: o.Size ?? 0,
    }));
    token = res.IsTruncated ? res.NextContinuationToken : undefined;
  } while (token);
}
