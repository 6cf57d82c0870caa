import 'server-only';
import { env } from '../env';
import { AppError } from '../errors';
import { getTokenOwnerByHash, touchToken } from '../queries/tokens';
import { getSessionUser } from './session';
import { hashToken, looksLikeToken } from './token-secret';

/**
 * Who is asking an /api/v1 route. CI jobs present a project token (`Authorization: Bearer
 * vgt_...`), which may upload to and read its own project only. The web app's own calls carry
 * the session cookie of a signed-in person, whose rights come from their workspace roles
 * (src/server/auth/scope.ts turns either into the project or run they may touch).
 */
export interface TokenCaller {
  kind: 'token';
  tokenId: string;
  workspaceId: string;
  projectId: string;
  projectSlug: string;
}

export interface UserCaller {
  kind: 'user';
  userId: string;
  email: string;
}

export type Caller = TokenCaller | UserCaller;

async function tokenCaller(header: string): Promise<TokenCaller> {
  const match = /^Bearer\s+(\S+)$/i.exec(header.trim());
  if (!match) throw new AppError('unauthorized:token', 'Authorization header must be `Bearer <token>`.');
  const token = match[1]!;
  if (!looksLikeToken(token))
    throw new AppError('unauthorized:token', 'This is not a Varigate token (they start with vgt_).');
  const owner = await getTokenOwnerByHash({ secretHash: hashToken(token) });
  if (!owner) throw new AppError('unauthorized:token', 'Unknown or revoked token.');
  // Last-used is informative only; never fail a request over it.
  void touchToken({ tokenId: owner.tokenId }).catch(() => {});
  return { kind: 'token', ...owner };
}

/** The caller of an /api/v1 request, or a 401 saying what is missing. */
export async function requireCaller(request: Request): Promise<Caller> {
  const header = request.headers.get('authorization');
  if (header) return tokenCaller(header);
  const user = await getSessionUser();
  if (user) {
    assertSameOrigin(request);
    return { kind: 'user', userId: user.id, email: user.email };
  }
  throw new AppError('unauthorized:token', 'Missing credentials: send `Authorization: Bearer <token>`, or sign in.');
}

/**
 * A session cookie rides along with any request the browser makes, also one that another site
 * triggers. SameSite=Lax stops most of those; for writes we also require the request to come from
 * a page of this app (the Origin header browsers attach to every non-GET fetch and form post).
 */
function assertSameOrigin(request: Request): void {
  if (request.method === 'GET' || request.method === 'HEAD') return;
  const origin = request.headers.get('origin');
  const own = new URL(request.url).origin;
  const allowed = new Set([own, new URL(env().APP_URL).origin]);
  if (!origin || !allowed.has(origin)) {
    throw new AppError('forbidden:origin', 'Requests made with a session must come from the Varigate app itself.');
  }
}

/** Routes that change who may do what (members, tokens, policies) are for people only. */
export function requireUserCaller(caller: Caller): UserCaller {
  if (caller.kind !== 'user') {
    throw new AppError(
      'forbidden:token',
      'CI tokens may upload and read only; this needs a signed-in person with the right role.',
    );
  }
  return caller;
}
