import { z } from 'zod';
import { ingestManifestSchema } from '@/src/ingest/manifest';

/** Names CI jobs send: a case or project slug, a build key, a branch. */
export const slugSchema = z
  .string()
  .trim()
  .regex(
    /^[A-Za-z0-9][A-Za-z0-9._-]{0,99}$/,
    'use letters, digits, dot, dash or underscore (at most 100), starting with a letter or digit',
  );

export const uploadFormatSchema = z.enum(['csv', 'csv-long', 'csv-wide', 'hdf5', 'netcdf']);

/** Fields that describe where a run belongs; shared by the multipart and the JSON form. */
export const runTargetSchema = z.object({
  /** Signed-in people name the workspace (slug); CI tokens imply it. */
  workspace: slugSchema.optional(),
  project: slugSchema.optional(),
  build: z.string().trim().min(1, 'the CI build key is required').max(200),
  commit: z.string().trim().min(1, 'the commit is required').max(100),
  branch: z.string().trim().min(1, 'the branch is required').max(200),
  case: slugSchema,
  ciUrl: z.url().max(2000).optional(),
  format: uploadFormatSchema.optional(),
  manifest: ingestManifestSchema.optional(),
});
export type RunTarget = z.infer<typeof runTargetSchema>;

/** The JSON form of POST /api/v1/runs: the file is already in object storage. */
export const runFromObjectSchema = runTargetSchema.extend({
  objectKey: z.string().min(1).max(1024),
  fileName: z.string().trim().min(1).max(255).optional(),
});
export type RunFromObject = z.infer<typeof runFromObjectSchema>;

/** POST /api/v1/uploads: ask for a presigned PUT URL. */
export const presignRequestSchema = z.object({
  workspace: slugSchema.optional(),
  project: slugSchema.optional(),
  fileName: z.string().trim().min(1).max(255),
  size: z.number().int().positive(),
  contentType: z.string().max(200).optional(),
});

export const runIdSchema = z.uuid('the run id must be a UUID');

export const stepQuerySchema = z.object({
  variable: z.string().trim().min(1).max(200).optional(),
  points: z.coerce.number().int().min(16).max(20_000).default(2000),
});

export const baselineRequestSchema = z.object({
  workspace: slugSchema.optional(),
  project: slugSchema.optional(),
  run: z.uuid('`run` must be the id of a finished run'),
  branch: z.string().trim().min(1).max(200).optional(),
});
