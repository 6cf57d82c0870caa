import 'server-only';
import { and, eq } from 'drizzle-orm';
import { getDb } from '@/db/client';
import { projects, workspaces } from '@/db/schema';
import { generateTokenSecret } from '../auth/token-secret';
import { AppError } from '../errors';
import { insertAuditEvent } from '../queries/audit';
import { insertToken } from '../queries/tokens';

export interface IssuedToken {
  id: string;
  name: string;
  prefix: string;
  /** The only time the secret exists in clear: show it once, never store it. */
  token: string;
}

export async function issueToken(input: { workspaceId: string; projectId: string; name: string; createdBy?: string | null }): Promise<IssuedToken> {
  const name = input.name.trim();
  if (name.length === 0 || name.length > 100) throw new AppError('invalid:token', 'A token name has 1 to 100 characters.');
  const secret = generateTokenSecret();
  const { id } = await insertToken({ ...input, name, prefix: secret.prefix, secretHash: secret.hash });
  await insertAuditEvent({
    workspaceId: input.workspaceId,
    actorUserId: input.createdBy ?? null,
    action: 'token.create',
    targetType: 'token',
    targetId: id,
    details: { name, prefix: secret.prefix, projectId: input.projectId },
  });
  return { id, name, prefix: secret.prefix, token: secret.token };
}

/** For the command line: a project by slug, with its workspace when the slug is ambiguous. */
export async function findProjectForCli({ projectSlug, workspaceSlug }: { projectSlug: string; workspaceSlug?: string }) {
  const rows = await getDb()
    .select({ projectId: projects.id, workspaceId: projects.workspaceId, workspaceSlug: workspaces.slug })
    .from(projects)
    .innerJoin(workspaces, eq(workspaces.id, projects.workspaceId))
    .where(workspaceSlug ? and(eq(projects.slug, projectSlug), eq(workspaces.slug, workspaceSlug)) : eq(projects.slug, projectSlug));
  if (rows.length === 0) throw new AppError('not_found:project', `No project "${projectSlug}"${workspaceSlug ? ` in workspace "${workspaceSlug}"` : ''}.`);
  if (rows.length > 1) {
    throw new AppError('conflict:project', `Several workspaces have a project "${projectSlug}" (${rows.map((r) => r.workspaceSlug).join(', ')}): add --workspace <slug>.`);
  }
  return rows[0]!;
}
