import 'server-only';
import { NextResponse } from 'next/server';
import { ZodError } from 'zod';
import { logger } from './logger';

/**
 * The one error type of the server. `code` is `<kind>:<subject>`, e.g. `not_found:run`,
 * `forbidden:project`, `invalid:upload`; the kind decides the HTTP status. Messages are meant
 * for the person or CI job that made the request: say what was wrong and where.
 */
export type ErrorKind =
  | 'invalid'
  | 'unauthorized'
  | 'forbidden'
  | 'not_found'
  | 'conflict'
  | 'too_large'
  | 'rate_limited'
  | 'unavailable'
  | 'internal';

const statusByKind: Record<ErrorKind, number> = {
  invalid: 400,
  unauthorized: 401,
  forbidden: 403,
  not_found: 404,
  conflict: 409,
  too_large: 413,
  rate_limited: 429,
  unavailable: 503,
  internal: 500,
};

export class AppError extends Error {
  override readonly name = 'AppError';
  readonly kind: ErrorKind;
  constructor(
    readonly code: `${ErrorKind}:${string}`,
    message: string,
    readonly details?: unknown,
  ) {
    super(message);
    this.kind = code.split(':')[0] as ErrorKind;
  }
  get status(): number {
    return statusByKind[this.kind];
  }
}

export interface ErrorBody {
  error: { code: string; message: string; details?: unknown };
}

/** Turns a zod failure into an `invalid:<subject>` error listing each field's problem. */
export function fromZod(subject: string, error: ZodError): AppError {
  const details = error.issues.map((i) => ({ path: i.path.join('.'), message: i.message }));
  const first = details[0];
  const message = first ? `${first.path || subject}: ${first.message}` : `invalid ${subject}`;
  return new AppError(`invalid:${subject}`, message, details);
}

/**
 * The JSON answer for any error thrown in a route handler. AppErrors say what they say; anything
 * else (database, storage, a bug) is logged in full and answered generically, so internals never
 * reach the client.
 */
export function errorResponse(err: unknown, context: Record<string, unknown> = {}): NextResponse<ErrorBody> {
  if (err instanceof AppError) {
    const body: ErrorBody = { error: { code: err.code, message: err.message } };
    if (err.details !== undefined) body.error.details = err.details;
    return NextResponse.json(body, { status: err.status });
  }
  logger.error({ err, ...context }, 'unhandled error in request');
  return NextResponse.json(
    { error: { code: 'internal:server', message: 'Something went wrong on our side; it has been logged.' } },
    { status: 500 },
  );
}
