import 'server-only';
import { createHash, randomUUID } from 'node:crypto';
import { createReadStream } from 'node:fs';
import { transaction } from '@/db/client';
import type { Run } from '@/db/schema';
import type { RunFromObject, RunTarget } from '@/src/schemas/runs';
import type { ProjectScope } from '../auth/scope';
import { env } from '../env';
import { AppError } from '../errors';
import { logger } from '../logger';
import { ensureBuild, reopenBuild } from '../queries/builds';
import { ensureCase } from '../queries/projects';
import { getRunByIdempotencyKey, insertRun, insertUpload } from '../queries/runs';
import { enqueue } from '../queue';
import { deleteObject, getObjectStream, headObject, presignPut, putObject } from '../storage';
import type { SpooledFile } from '../http/multipart';
import { ANALYSE_RUN_JOB, analyseJobKey } from '../jobs/names';

export interface CreatedRun {
  run: Pick<Run, 'id' | 'status'>;
  /** False when an Idempotency-Key matched an earlier request and its run is returned. */
  created: boolean;
}

interface StoredObject {
  objectKey: string;
  fileName: string;
  size: number;
  sha256: string;
  contentType?: string | null;
}

function objectKeyFor(scope: ProjectScope, fileName: string): string {
  const safeName = fileName.replace(/[^A-Za-z0-9._-]/g, '_').slice(-120) || 'upload';
  return `incoming/${scope.workspaceId}/${scope.projectId}/${randomUUID()}/${safeName}`;
}

/** SHA-256 over what defines a request, to tell a retry from a different request with a reused key. */
function requestHash(target: RunTarget, contentSha256: string): string {
  const canonical = JSON.stringify([
    target.build,
    target.commit,
    target.branch,
    target.case,
    target.format ?? null,
    target.manifest ?? null,
    contentSha256,
  ]);
  return createHash('sha256').update(canonical).digest('hex');
}

async function findIdempotentRun(
  scope: ProjectScope,
  key: string | undefined,
  hash: string,
): Promise<CreatedRun | undefined> {
  if (!key) return undefined;
  const existing = await getRunByIdempotencyKey({ projectId: scope.projectId, key });
  if (!existing) return undefined;
  if (existing.requestHash !== hash) {
    throw new AppError(
      'conflict:idempotency',
      'This Idempotency-Key was already used for a different request (other fields or another file).',
    );
  }
  return { run: { id: existing.id, status: existing.status }, created: false };
}

function isUniqueViolation(err: unknown): boolean {
  return typeof err === 'object' && err !== null && (err as { code?: string }).code === '23505';
}

/**
 * Records a run for a stored object and queues its analysis, all in one transaction: when this
 * returns, the file is in object storage and the run and its job are committed.
 */
async function recordRun(
  scope: ProjectScope,
  target: RunTarget,
  object: StoredObject,
  idempotencyKey: string | undefined,
  hash: string,
): Promise<CreatedRun> {
  try {
    const run = await transaction(async (tx) => {
      const build = await ensureBuild(
        {
          workspaceId: scope.workspaceId,
          projectId: scope.projectId,
          key: target.build,
          commit: target.commit,
          branch: target.branch,
          ciUrl: target.ciUrl,
        },
        tx,
      );
      if (build.commit !== target.commit || build.branch !== target.branch) {
        throw new AppError(
          'conflict:build',
          `Build "${target.build}" was first posted for commit ${build.commit} on ${build.branch}; this upload says ${target.commit} on ${target.branch}.`,
        );
      }
      const kase = await ensureCase(
        { workspaceId: scope.workspaceId, projectId: scope.projectId, name: target.case },
        tx,
      );
      const created = await insertRun(
        {
          workspaceId: scope.workspaceId,
          projectId: scope.projectId,
          buildId: build.id,
          caseId: kase.id,
          manifest: { format: target.format ?? null, ...(target.manifest ?? {}) },
          idempotencyKey: idempotencyKey ?? null,
          requestHash: hash,
        },
        tx,
      );
      await insertUpload(
        {
          workspaceId: scope.workspaceId,
          runId: created.id,
          objectKey: object.objectKey,
          fileName: object.fileName,
          size: object.size,
          sha256: object.sha256,
          format: target.format ?? null,
          contentType: object.contentType ?? null,
        },
        tx,
      );
      await reopenBuild({ buildId: build.id }, tx);
      await enqueue(
        { kind: ANALYSE_RUN_JOB, payload: { runId: created.id }, dedupeKey: analyseJobKey(created.id) },
        tx,
      );
      return created;
    });
    return { run: { id: run.id, status: run.status }, created: true };
  } catch (err) {
    // Two identical retries racing: the loser finds the winner's run.
    if (idempotencyKey && isUniqueViolation(err)) {
      const again = await findIdempotentRun(scope, idempotencyKey, hash);
      if (again) return again;
    }
    throw err;
  }
}

/** POST /api/v1/runs with multipart: store the spooled file, then record the run. */
export async function createRunFromFile(input: {
  scope: ProjectScope;
  target: RunTarget;
  file: SpooledFile;
  idempotencyKey?: string;
}): Promise<CreatedRun> {
  const { scope, target, file, idempotencyKey } = input;
  if (file.size === 0) throw new AppError('invalid:upload', `The file "${file.fileName}" is empty.`);
  const hash = requestHash(target, file.sha256);
  const earlier = await findIdempotentRun(scope, idempotencyKey, hash);
  if (earlier) return earlier;

  const objectKey = objectKeyFor(scope, file.fileName);
  await putObject({
    key: objectKey,
    body: createReadStream(file.path),
    contentLength: file.size,
    contentType: file.contentType,
  });
  try {
    return await recordRun(
      scope,
      target,
      { objectKey, fileName: file.fileName, size: file.size, sha256: file.sha256, contentType: file.contentType },
      idempotencyKey,
      hash,
    );
  } catch (err) {
    // The run was not recorded: do not leave an orphan object behind.
    await deleteObject(objectKey).catch((e: unknown) =>
      logger.warn({ err: e, objectKey }, 'could not remove orphan upload'),
    );
    throw err;
  }
}

/** POST /api/v1/runs with JSON: the file was uploaded through a presigned URL first. */
export async function createRunFromObject(input: {
  scope: ProjectScope;
  body: RunFromObject;
  idempotencyKey?: string;
}): Promise<CreatedRun> {
  const { scope, body, idempotencyKey } = input;
  const ownPrefix = `incoming/${scope.workspaceId}/${scope.projectId}/`;
  if (!body.objectKey.startsWith(ownPrefix)) {
    throw new AppError(
      'forbidden:upload',
      "This objectKey was not issued to this token's project; ask POST /api/v1/uploads for one.",
    );
  }
  const head = await headObject(body.objectKey);
  if (!head) {
    throw new AppError(
      'invalid:upload',
      `No uploaded object at "${body.objectKey}": PUT the file to the presigned URL before posting the run.`,
    );
  }
  if (head.size === 0) throw new AppError('invalid:upload', 'The uploaded object is empty.');
  if (head.size > env().VARIGATE_MAX_OBJECT_BYTES) {
    throw new AppError(
      'too_large:upload',
      `The uploaded object has ${head.size} bytes; the limit is ${env().VARIGATE_MAX_OBJECT_BYTES}.`,
    );
  }
  // Hash the content, not the key: a CI job that re-runs uploads the same bytes under a new
  // presigned key, and must get its earlier run back rather than a conflict.
  const sha256 = await sha256OfObject(body.objectKey);
  const hash = requestHash(body, sha256);
  const earlier = await findIdempotentRun(scope, idempotencyKey, hash);
  if (earlier) {
    return earlier;
  }
  const fileName = body.fileName ?? body.objectKey.split('/').pop() ?? 'upload';
  return recordRun(
    scope,
    body,
    { objectKey: body.objectKey, fileName, size: head.size, sha256, contentType: head.contentType },
    idempotencyKey,
    hash,
  );
}

async function sha256OfObject(key: string): Promise<string> {
  const hash = createHash('sha256');
  for await (const chunk of await getObjectStream(key)) hash.update(chunk as Buffer);
  return hash.digest('hex');
}

/** POST /api/v1/uploads: a presigned PUT URL for a file too large to post through the app. */
export async function presignUpload(input: {
  scope: ProjectScope;
  fileName: string;
  size: number;
  contentType?: string;
}): Promise<{
  objectKey: string;
  url: string;
  method: 'PUT';
  headers: Record<string, string>;
  expiresAt: string;
}> {
  const max = env().VARIGATE_MAX_OBJECT_BYTES;
  if (input.size > max)
    throw new AppError('too_large:upload', `The file has ${input.size} bytes; the limit is ${max}.`);
  const objectKey = objectKeyFor(input.scope, input.fileName);
  const contentType = input.contentType ?? 'application/octet-stream';
  const expiresIn = 900;
  const url = await presignPut({ key: objectKey, contentType, expiresIn });
  return {
    objectKey,
    url,
    method: 'PUT',
    headers: { 'content-type': contentType },
    expiresAt: new Date(Date.now() + expiresIn * 1000).toISOString(),
  };
}
