import type { IngestManifest } from '@/src/ingest/manifest';

/**
 * The browser side of a manual upload, one small function per step: ask the API for a presigned
 * URL, PUT the file straight to object storage (XMLHttpRequest, for upload progress events,
 * which fetch does not give), post the run, and poll it until it has a verdict. Each call goes
 * through the same /api/v1 routes as CI, authenticated by the session cookie.
 */

export class UploadStepError extends Error {
  override readonly name = 'UploadStepError';
}

interface ApiErrorBody {
  error?: { message?: string; details?: { path?: string; message?: string }[] };
}

/** The API's own message for a refused request, else a generic one naming the step. */
async function failure(res: Response, step: string): Promise<UploadStepError> {
  let body: ApiErrorBody | null = null;
  try {
    body = (await res.json()) as ApiErrorBody;
  } catch {
    // Not JSON (a proxy's error page): fall back to the status.
  }
  return new UploadStepError(
    body?.error?.message ? `${step}: ${body.error.message}` : `${step} failed (HTTP ${res.status}).`,
  );
}

export interface PresignedUpload {
  objectKey: string;
  url: string;
  headers: Record<string, string>;
}

export async function requestPresignedUpload(input: {
  workspace: string;
  project: string;
  fileName: string;
  size: number;
  contentType: string;
}): Promise<PresignedUpload> {
  const res = await fetch('/api/v1/uploads', {
    method: 'POST',
    headers: { 'content-type': 'application/json' },
    body: JSON.stringify(input),
  });
  if (!res.ok) throw await failure(res, 'Preparing the upload');
  const { upload } = (await res.json()) as { upload: PresignedUpload };
  return upload;
}

/**
 * PUTs the file to the presigned URL, reporting bytes sent. Resolves when storage answered 2xx.
 * The request is cross-origin: the bucket's CORS rule and the page's CSP connect-src must allow it.
 */
export function putFileWithProgress(
  upload: PresignedUpload,
  file: Blob,
  onProgress: (sent: number, total: number) => void,
  signal?: AbortSignal,
): Promise<void> {
  return new Promise((resolve, reject) => {
    const xhr = new XMLHttpRequest();
    xhr.open('PUT', upload.url);
    for (const [name, value] of Object.entries(upload.headers)) xhr.setRequestHeader(name, value);
    xhr.upload.onprogress = (e) => onProgress(e.loaded, e.lengthComputable ? e.total : file.size);
    xhr.onload = () => {
      if (xhr.status >= 200 && xhr.status < 300) {
        onProgress(file.size, file.size);
        resolve();
      } else {
        reject(new UploadStepError(`Object storage refused the file (HTTP ${xhr.status}).`));
      }
    };
    // Network failures, CORS refusals and CSP blocks all end here, without details (browsers hide them).
    xhr.onerror = () =>
      reject(
        new UploadStepError(
          'The file could not be sent to object storage (network, CORS or content-security-policy refusal).',
        ),
      );
    xhr.onabort = () => reject(new UploadStepError('The upload was cancelled.'));
    signal?.addEventListener('abort', () => xhr.abort(), { once: true });
    xhr.send(file);
  });
}

export interface RunRequest {
  workspace: string;
  project: string;
  build: string;
  commit: string;
  branch: string;
  case: string;
  manifest?: IngestManifest;
  objectKey: string;
  fileName: string;
}

/**
 * A random Idempotency-Key. crypto.randomUUID exists only in secure contexts (https, localhost),
 * so an instance served over plain http on a LAN address falls back to getRandomValues.
 */
export function newIdempotencyKey(): string {
  if (typeof crypto.randomUUID === 'function') return crypto.randomUUID();
  return Array.from(crypto.getRandomValues(new Uint8Array(16)), (b) => b.toString(16).padStart(2, '0')).join('');
}

/** Posts the run for the stored object; the idempotency key makes a retried post return the same run. */
export async function postRun(body: RunRequest, idempotencyKey: string): Promise<{ id: string; status: string }> {
  const res = await fetch('/api/v1/runs', {
    method: 'POST',
    headers: { 'content-type': 'application/json', 'idempotency-key': idempotencyKey },
    body: JSON.stringify(body),
  });
  if (!res.ok) throw await failure(res, 'Recording the run');
  const { run } = (await res.json()) as { run: { id: string; status: string } };
  return run;
}

export interface RunStatus {
  status: string;
  verdict: string | null;
  errorMessage: string | null;
}

const sleep = (ms: number, signal?: AbortSignal) =>
  new Promise<void>((resolve) => {
    const timer = setTimeout(resolve, ms);
    signal?.addEventListener('abort', () => {
      clearTimeout(timer);
      resolve();
    });
  });

/** Polls the run until it is done or in error: every 0.5 s at first, then less often, at most every 3 s. */
export async function waitForRunVerdict(
  id: string,
  onStatus: (s: RunStatus) => void,
  signal?: AbortSignal,
): Promise<RunStatus> {
  let delay = 500;
  for (;;) {
    const res = await fetch(`/api/v1/runs/${encodeURIComponent(id)}`, { cache: 'no-store', signal });
    if (!res.ok) throw await failure(res, 'Reading the run');
    const { run } = (await res.json()) as { run: RunStatus };
    onStatus(run);
    if (run.status === 'done' || run.status === 'error') return run;
    await sleep(delay, signal);
    if (signal?.aborted) throw new UploadStepError('Stopped waiting for the verdict.');
    delay = Math.min(3000, Math.round(delay * 1.5));
  }
}
