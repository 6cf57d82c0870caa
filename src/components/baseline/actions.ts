'use server';

import { revalidatePath } from 'next/cache';
import { z } from 'zod';
import { slugSchema } from '@/src/schemas/runs';
import { authorizeMember } from '@/src/server/auth/session';
import { AppError } from '@/src/server/errors';
import { acceptBaselineAsMember } from '@/src/server/services/policies';

/**
 * The baseline panel's action. It lives beside the component because the panel is embedded by
 * more than one page (run page, case page). Public endpoint: parses and authorizes itself.
 */

export interface AcceptBaselineState {
  ok?: boolean;
  message?: string;
}

const acceptInputSchema = z.object({
  workspace: slugSchema,
  project: slugSchema,
  case: slugSchema,
  runId: z.uuid(),
  branch: z.string().trim().min(1).max(200),
});

export async function acceptBaselineAction(input: unknown): Promise<AcceptBaselineState> {
  const parsed = acceptInputSchema.safeParse(input);
  if (!parsed.success) return { message: 'The request did not arrive intact; reload the page and try again.' };
  const { workspace, project, case: caseName, runId, branch } = parsed.data;
  try {
    const member = await authorizeMember(workspace, 'maintainer');
    await acceptBaselineAsMember(member, { projectSlug: project, caseName, runId, branch });
  } catch (err) {
    if (err instanceof AppError) return { message: err.message };
    throw err;
  }
  revalidatePath(`/w/${workspace}/projects/${project}/cases/${caseName}`);
  revalidatePath(`/w/${workspace}/runs/${runId}`);
  return { ok: true, message: `Accepted: later runs of ${caseName} on ${branch} are compared with this run.` };
}
