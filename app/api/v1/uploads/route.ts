import { requireCaller } from '@/src/server/auth/caller';
import { json, parseOrThrow, readJson, route } from '@/src/server/http/handler';
import { presignUpload } from '@/src/server/services/runs';
import { presignRequestSchema } from '@/src/schemas/runs';

export const dynamic = 'force-dynamic';

/** A presigned PUT URL for a large file; then POST /api/v1/runs with its objectKey. */
export const POST = route(async (request) => {
  const caller = await requireCaller(request);
  const body = parseOrThrow(presignRequestSchema, 'upload', await readJson(request));
  return json({ upload: await presignUpload({ caller, ...body }) }, 201);
});
