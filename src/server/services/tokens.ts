import 'server-only';
import { and, eq } from 'drizzle-orm';
import { getDb, transaction } from '@/db/client';
import { projects, workspaces, type Project } from '@/db/schema';
import { roleAtLeast } from '../auth/roles';
import type { MemberContext } from '../auth/session';
import { generateTokenSecret } from '../auth/token-secret';
import { AppError } from '../errors';
import { insertAuditEvent } from '../queries/audit';
import { getProjectById, listProjects } from '../queries/projects';
import { getTokenById, insertToken, listTokens, revokeToken, type TokenRow } from '../queries/tokens';

export interface IssuedToken {
  id: string;
  name: string;
  prefix: string;
  /** The only time the secret exists in clear: show it once, never store it. */
  token: string;
}

export async function issueToken(input: {
  workspaceId: string;
  projectId: string;
  name: string;
  createdBy?: string | null;
}): Promise<IssuedToken> {
  const name = input.name.trim();
  if (name.length === 0 || name.length > 100)
    throw new AppError('invalid:token', 'A token name has 1 to 100 characters.');
  const secret = generateTokenSecret();
  // The token and its audit event land together: no credential exists without its record.
  const { id } = await transaction(async (tx) => {
    const row = await insertToken({ ...input, name, prefix: secret.prefix, secretHash: secret.hash }, tx);
    await insertAuditEvent(
      {
        workspaceId: input.workspaceId,
        actorUserId: input.createdBy ?? null,
        action: 'token.create',
        targetType: 'token',
        targetId: row.id,
        details: { name, prefix: secret.prefix, projectId: input.projectId },
      },
      tx,
    );
    return row;
  });
  return { id, name, prefix: secret.prefix, token: secret.token };
}

/** Tokens are a maintainer's business; the action checks this too, the service does not rely on it. */
function requireMaintainer(ctx: MemberContext): void {
  if (!roleAtLeast(ctx.role, 'maintainer'))
    throw new AppError('forbidden:role', 'Only maintainers and admins manage CI tokens.');
}

export interface TokensView {
  tokens: TokenRow[];
  projects: Pick<Project, 'id' | 'slug' | 'name'>[];
}

export async function loadTokensView(ctx: MemberContext): Promise<TokensView> {
  requireMaintainer(ctx);
  const [tokens, projectRows] = await Promise.all([
    listTokens({ workspaceId: ctx.workspace.id }),
    listProjects({ workspaceId: ctx.workspace.id }),
  ]);
  return { tokens, projects: projectRows.map((p) => ({ id: p.id, slug: p.slug, name: p.name })) };
}

/** Issues a token for a project of the caller's workspace; a project id from elsewhere is "not found". */
export async function createProjectToken(
  ctx: MemberContext,
  input: { projectId: string; name: string },
): Promise<IssuedToken & { projectSlug: string }> {
  requireMaintainer(ctx);
  const project = await getProjectById({ workspaceId: ctx.workspace.id, id: input.projectId });
  if (!project) throw new AppError('not_found:project', 'No such project in this workspace.');
  const issued = await issueToken({
    workspaceId: ctx.workspace.id,
    projectId: project.id,
    name: input.name,
    createdBy: ctx.user.id,
  });
  return { ...issued, projectSlug: project.slug };
}

export async function revokeProjectToken(
  ctx: MemberContext,
  input: { tokenId: string },
): Promise<{ name: string; prefix: string }> {
  requireMaintainer(ctx);
  return transaction(async (tx) => {
    const token = await getTokenById({ workspaceId: ctx.workspace.id, id: input.tokenId }, tx);
    if (!token) throw new AppError('not_found:token', 'No such token in this workspace.');
    if (!(await revokeToken({ workspaceId: ctx.workspace.id, id: token.id }, tx))) {
      throw new AppError('conflict:token', `Token ${token.prefix} was already revoked.`);
    }
    await insertAuditEvent(
      {
        workspaceId: ctx.workspace.id,
        actorUserId: ctx.user.id,
        action: 'token.revoke',
        targetType: 'token',
        targetId: token.id,
        details: { name: token.name, prefix: token.prefix, projectId: token.projectId },
      },
      tx,
    );
    return { name: token.name, prefix: token.prefix };
  });
}

/** For the command line: a project by slug, with its workspace when the slug is ambiguous. */
export async function findProjectForCli({
  projectSlug,
  workspaceSlug,
}: {
  projectSlug: string;
  workspaceSlug?: string;
}) {
  const rows = await getDb()
    .select({ projectId: projects.id, workspaceId: projects.workspaceId, workspaceSlug: workspaces.slug })
    .from(projects)
    .innerJoin(workspaces, eq(workspaces.id, projects.workspaceId))
    .where(
      workspaceSlug
        ? and(eq(projects.slug, projectSlug), eq(workspaces.slug, workspaceSlug))
        : eq(projects.slug, projectSlug),
    );
  if (rows.length === 0)
    throw new AppError(
      'not_found:project',
      `No project "${projectSlug}"${workspaceSlug ? ` in workspace "${workspaceSlug}"` : ''}.`,
    );
  if (rows.length > 1) {
    throw new AppError(
      'conflict:project',
      `Several workspaces have a project "${projectSlug}" (${rows.map((r) => r.workspaceSlug).join(', ')}): add --workspace <slug>.`,
    );
  }
  return rows[0]!;
}
