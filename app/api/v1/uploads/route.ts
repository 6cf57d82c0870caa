import { requireCaller } from '@/src/server/auth/caller';
import { resolveProjectScope } from '@/src/server/auth/scope';
import { json, parseOrThrow, readJson, route } from '@/src/server/http/handler';
import { presignUpload } from '@/src/server/services/runs';
import { presignRequestSchema } from '@/src/schemas/runs';

export const dynamic = 'force-dynamic';

/** A presigned PUT URL for a large file; then POST /api/v1/runs with its objectKey. */
export const POST = route(async (request) => {
  const caller = await requireCaller(request);
  const body = parseOrThrow(presignRequestSchema, 'upload', await readJson(request));
  const scope = await resolveProjectScope(caller, body, 'maintainer');
  return json(
    { upload: await presignUpload({ scope, fileName: body.fileName, size: body.size, contentType: body.contentType }) },
    201,
  );
});
