import 'server-only';
import { AppError } from '../errors';
import { getProjectBySlug } from '../queries/projects';
import { getRunProject } from '../queries/runs';
import { getMembershipById, getMembershipBySlug } from '../queries/users';
import type { Caller } from './caller';
import { roleAtLeast, type Role } from './roles';

/**
 * What an API call may touch, resolved once per request from the caller: a project (for uploads
 * and build look-ups) or a run (for reads by id). Services take these scopes, never a raw id
 * they would have to check themselves, so no service can forget the check.
 */
export interface ProjectScope {
  workspaceId: string;
  projectId: string;
  projectSlug: string;
  /** Who acts, for audit events and baselines. */
  userId?: string;
  tokenId?: string;
}

export interface RunScope {
  workspaceId: string;
  projectId: string;
  runId: string;
}

/**
 * A token reaches its own project (naming another is a 403). A person names the workspace and
 * project and needs at least `role` there; a workspace they are not in is a 404.
 */
export async function resolveProjectScope(
  caller: Caller,
  target: { workspace?: string; project?: string },
  role: Role,
): Promise<ProjectScope> {
  if (caller.kind === 'token') {
    if (target.project !== undefined && target.project !== caller.projectSlug) {
      throw new AppError(
        'forbidden:project',
        `This token belongs to project "${caller.projectSlug}", not "${target.project}".`,
      );
    }
    return {
      workspaceId: caller.workspaceId,
      projectId: caller.projectId,
      projectSlug: caller.projectSlug,
      tokenId: caller.tokenId,
    };
  }
  if (!target.workspace || !target.project) {
    throw new AppError('invalid:scope', 'Name the `workspace` and `project` (their slugs).');
  }
  const membership = await getMembershipBySlug({ userId: caller.userId, slug: target.workspace });
  if (!membership) throw new AppError('not_found:workspace', `No workspace "${target.workspace}".`);
  if (!roleAtLeast(membership.role, role)) {
    throw new AppError(
      'forbidden:role',
      `This needs the ${role} role in "${target.workspace}"; you are ${membership.role}.`,
    );
  }
  const project = await getProjectBySlug({ workspaceId: membership.workspaceId, slug: target.project });
  if (!project) throw new AppError('not_found:project', `No project "${target.project}" in "${target.workspace}".`);
  return {
    workspaceId: membership.workspaceId,
    projectId: project.id,
    projectSlug: project.slug,
    userId: caller.userId,
  };
}

/** A run the caller may read; any run they may not see is a 404, exactly like a missing one. */
export async function resolveRunScope(caller: Caller, runId: string): Promise<RunScope> {
  const run = await getRunProject({ id: runId });
  const missing = new AppError('not_found:run', `No run ${runId} here.`);
  if (!run) throw missing;
  if (caller.kind === 'token') {
    if (run.projectId !== caller.projectId) throw missing;
  } else if (!(await getMembershipById({ userId: caller.userId, workspaceId: run.workspaceId }))) {
    throw missing;
  }
  return { workspaceId: run.workspaceId, projectId: run.projectId, runId };
}
