import { requireCaller } from '@/src/server/auth/caller';
import { resolveProjectScope } from '@/src/server/auth/scope';
import { env } from '@/src/server/env';
import { json, parseOrThrow, readJson, route } from '@/src/server/http/handler';
import { readMultipartUpload } from '@/src/server/http/multipart';
import { AppError } from '@/src/server/errors';
import { createRunFromFile, createRunFromObject } from '@/src/server/services/runs';
import { runFromObjectSchema, runTargetSchema } from '@/src/schemas/runs';

export const dynamic = 'force-dynamic';

function idempotencyKeyOf(request: Request): string | undefined {
  const key = request.headers.get('idempotency-key')?.trim();
  if (key === undefined || key === '') return undefined;
  if (key.length > 200) throw new AppError('invalid:idempotency', 'Idempotency-Key must be at most 200 characters.');
  return key;
}

/** The manifest arrives as a JSON string in a form field. */
function manifestField(raw: string | undefined): unknown {
  if (raw === undefined || raw.trim() === '') return undefined;
  try {
    return JSON.parse(raw);
  } catch {
    throw new AppError('invalid:manifest', 'The `manifest` field is not valid JSON.');
  }
}

function runUrl(id: string): string {
  return `${env().APP_URL}/api/v1/runs/${id}`;
}

/**
 * Posts one regression case of a CI build: multipart with a file, or JSON naming an uploaded
 * object. CI tokens post to their project; signed-in maintainers name `workspace` and `project`.
 */
export const POST = route(async (request) => {
  const caller = await requireCaller(request);
  const idempotencyKey = idempotencyKeyOf(request);
  const contentType = request.headers.get('content-type') ?? '';

  if (contentType.toLowerCase().startsWith('application/json')) {
    const body = parseOrThrow(runFromObjectSchema, 'run', await readJson(request));
    const scope = await resolveProjectScope(caller, body, 'maintainer');
    const { run, created } = await createRunFromObject({ scope, body, idempotencyKey });
    return json({ run: { ...run, url: runUrl(run.id) } }, created ? 202 : 200);
  }

  const upload = await readMultipartUpload(request, { maxBytes: env().VARIGATE_MAX_UPLOAD_BYTES });
  try {
    const { file: _file, manifest, ...rest } = upload.fields;
    const target = parseOrThrow(runTargetSchema, 'run', { ...rest, manifest: manifestField(manifest) });
    if (!upload.file) throw new AppError('invalid:upload', 'No file: send the snapshot file in a part named `file`.');
    const scope = await resolveProjectScope(caller, target, 'maintainer');
    const { run, created } = await createRunFromFile({ scope, target, file: upload.file, idempotencyKey });
    return json({ run: { ...run, url: runUrl(run.id) } }, created ? 202 : 200);
  } finally {
    await upload.cleanup();
  }
});
