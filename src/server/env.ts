import 'server-only';
import { z } from 'zod';

/**
 * The environment, validated once. Every variable is documented in .env.example. Read through
 * `env()` rather than `process.env.X` so that a missing or malformed setting fails at start-up
 * with a message naming it, instead of deep inside a request.
 */
const envSchema = z.object({
  NODE_ENV: z.enum(['development', 'production', 'test']).default('development'),
  DATABASE_URL: z.url({ protocol: /^postgres(ql)?$/ }),
  DATABASE_POOL_SIZE: z.coerce.number().int().min(1).max(100).default(10),
  S3_ENDPOINT: z.url().optional(),
  S3_REGION: z.string().min(1).default('us-east-1'),
  S3_BUCKET: z.string().min(3),
  S3_ACCESS_KEY_ID: z.string().min(1),
  S3_SECRET_ACCESS_KEY: z.string().min(1),
  S3_FORCE_PATH_STYLE: z
    .enum(['true', 'false'])
    .default('true')
    .transform((v) => v === 'true'),
  SMTP_URL: z.string().regex(/^smtps?:\/\//, 'must start with smtp:// or smtps://'),
  MAIL_FROM: z.string().min(3).default('Varigate <varigate@localhost>'),
  /** Only in development and tests: the local catcher's HTTP API behind /dev/mail. */
  MAIL_CATCHER_URL: z.url().optional(),
  APP_URL: z.url().default('http://localhost:3000'),
  AUTH_SECRET: z.string().min(32, 'AUTH_SECRET must be at least 32 characters').optional(),
  /** Largest file accepted through POST /api/v1/runs (multipart); larger ones go presigned. */
  VARIGATE_MAX_UPLOAD_BYTES: z.coerce
    .number()
    .int()
    .positive()
    .default(256 * 1024 * 1024),
  /** Largest file accepted through a presigned upload. */
  VARIGATE_MAX_OBJECT_BYTES: z.coerce
    .number()
    .int()
    .positive()
    .default(2 * 1024 * 1024 * 1024),
  LOG_LEVEL: z.enum(['fatal', 'error', 'warn', 'info', 'debug', 'trace', 'silent']).default('info'),
});

export type Env = z.infer<typeof envSchema>;

let cached: Env | undefined;

export function env(): Env {
  if (cached) return cached;
  const parsed = envSchema.safeParse(process.env);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `  ${i.path.join('.')}: ${i.message}`);
    throw new Error(`Invalid environment (see .env.example):\n${lines.join('\n')}`);
  }
  cached = parsed.data;
  return cached;
}
