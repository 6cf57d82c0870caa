'use server';

import { revalidatePath } from 'next/cache';
import { z } from 'zod';
import type { PolicySaveState } from '@/src/components/policy/policy-form-state';
import { projectSettingsInputSchema } from '@/src/schemas/policy-form';
import { authorizeMember } from '@/src/server/auth/session';
import { AppError } from '@/src/server/errors';
import { saveProjectSettings } from '@/src/server/services/policies';

/** Saves a project's name, default branch and default policy; maintainers only (checked here and in the service). */
export async function saveProjectSettingsAction(input: unknown): Promise<PolicySaveState> {
  const parsed = projectSettingsInputSchema.safeParse(input);
  if (!parsed.success) {
    return {
      message: 'Some fields need attention.',
      fieldErrors: z.flattenError(parsed.error).fieldErrors as Record<string, string[]>,
    };
  }
  const { workspace, project, name, defaultBranch, values } = parsed.data;
  try {
    const member = await authorizeMember(workspace, 'maintainer');
    await saveProjectSettings(member, { projectSlug: project, name, defaultBranch, values });
  } catch (err) {
    if (err instanceof AppError) {
      return {
        message: err.message,
        fieldErrors: (err.details as { fieldErrors?: Record<string, string[]> } | undefined)?.fieldErrors,
      };
    }
    throw err;
  }
  // Every page of the project shows its name or judges with its policy.
  revalidatePath(`/w/${workspace}/projects/${project}`, 'layout');
  return { ok: true, message: 'Settings saved. The default policy applies to the next run of every case.' };
}
