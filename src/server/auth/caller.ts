import 'server-only';
import { AppError } from '../errors';
import { getTokenOwnerByHash, touchToken } from '../queries/tokens';
import { hashToken, looksLikeToken } from './token-secret';

/**
 * Who is asking. CI jobs present a project token (`Authorization: Bearer vgt_...`); a token may
 * upload to and read its own project only. (Signed-in people come with the session sign-in.)
 */
export interface TokenCaller {
  kind: 'token';
  tokenId: string;
  workspaceId: string;
  projectId: string;
  projectSlug: string;
}

export type Caller = TokenCaller;

/** The caller of an /api/v1 request, or a 401 explaining what is missing. */
export async function requireCaller(request: Request): Promise<Caller> {
  const header = request.headers.get('authorization');
  if (!header) {
    throw new AppError('unauthorized:token', 'Missing Authorization header: send `Authorization: Bearer <token>`.');
  }
  const match = /^Bearer\s+(\S+)$/i.exec(header.trim());
  if (!match) throw new AppError('unauthorized:token', 'Authorization header must be `Bearer <token>`.');
  const token = match[1]!;
  if (!looksLikeToken(token)) throw new AppError('unauthorized:token', 'This is not a Varigate token (they start with vgt_).');
  const owner = await getTokenOwnerByHash({ secretHash: hashToken(token) });
  if (!owner) throw new AppError('unauthorized:token', 'Unknown or revoked token.');
  // Last-used is informative only; never fail a request over it.
  void touchToken({ tokenId: owner.tokenId }).catch(() => {});
  return { kind: 'token', ...owner };
}

/** A token reaches only its own project: naming another one is a 403. */
export function assertProjectAccess(caller: Caller, projectSlug: string | undefined): void {
  if (projectSlug !== undefined && projectSlug !== caller.projectSlug) {
    throw new AppError('forbidden:project', `This token belongs to project "${caller.projectSlug}", not "${projectSlug}".`);
  }
}
