import 'server-only';
import { NextResponse } from 'next/server';
import type { ZodType } from 'zod';
import { AppError, errorResponse, fromZod } from '../errors';

type Params = Record<string, string | string[] | undefined>;
type Handler<P extends Params> = (request: Request, params: P) => Promise<Response>;

/**
 * Wraps a route handler so that every thrown error becomes the one JSON error shape, with the
 * right status, and nothing unexpected leaks as a bare 500 page.
 */
export function route<P extends Params = Params>(handler: Handler<P>) {
  return async (request: Request, context: { params: Promise<P> }): Promise<Response> => {
    try {
      return await handler(request, await context.params);
    } catch (err) {
      return errorResponse(err, { method: request.method, path: new URL(request.url).pathname });
    }
  };
}

/** Parses with zod or throws `invalid:<subject>` naming the first bad field. */
export function parseOrThrow<T>(schema: ZodType<T>, subject: string, input: unknown): T {
  const result = schema.safeParse(input);
  if (!result.success) throw fromZod(subject, result.error);
  return result.data;
}

/** Reads a JSON body, answering 400 (not 500) when it is not JSON. */
export async function readJson(request: Request): Promise<unknown> {
  try {
    return await request.json();
  } catch {
    throw new AppError('invalid:json', 'The request body is not valid JSON.');
  }
}

export function json(body: unknown, status = 200, headers: Record<string, string> = {}): NextResponse {
  return NextResponse.json(body, { status, headers: { 'cache-control': 'no-store', ...headers } });
}
