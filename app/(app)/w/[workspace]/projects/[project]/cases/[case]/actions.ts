'use server';

import { revalidatePath } from 'next/cache';
import { z } from 'zod';
import type { PolicyPreviewState, PolicySaveState } from '@/src/components/policy/policy-form-state';
import { casePolicyInputSchema } from '@/src/schemas/policy-form';
import { authorizeMember } from '@/src/server/auth/session';
import { AppError } from '@/src/server/errors';
import { previewCasePolicy, saveCasePolicy } from '@/src/server/services/policies';

/**
 * The case page's policy actions. Public endpoints like any server action: each parses its input
 * with zod and checks the caller's role itself.
 */

function refusal(err: unknown): { message: string; fieldErrors?: Record<string, string[]> } {
  if (err instanceof AppError) {
    const details = err.details as { fieldErrors?: Record<string, string[]> } | undefined;
    return { message: err.message, fieldErrors: details?.fieldErrors };
  }
  throw err;
}

function badInput(error: z.ZodError): { message: string; fieldErrors: Record<string, string[]> } {
  return {
    message: 'The form did not arrive intact; reload the page and try again.',
    fieldErrors: z.flattenError(error).fieldErrors as Record<string, string[]>,
  };
}

/** Re-judges the latest analysed run with the candidate policy; stores nothing. */
export async function previewCasePolicyAction(input: unknown): Promise<PolicyPreviewState> {
  const parsed = casePolicyInputSchema.safeParse(input);
  if (!parsed.success) return badInput(parsed.error);
  const { workspace, project, case: caseName, values } = parsed.data;
  try {
    const member = await authorizeMember(workspace, 'maintainer');
    const preview = await previewCasePolicy(member, { projectSlug: project, caseName, values });
    return { preview, previewed: true };
  } catch (err) {
    return refusal(err);
  }
}

/** Stores the case policy and, when asked, re-judges the latest analysed run with it. */
export async function saveCasePolicyAction(input: unknown): Promise<PolicySaveState> {
  const parsed = casePolicyInputSchema.safeParse(input);
  if (!parsed.success) return badInput(parsed.error);
  const { workspace, project, case: caseName, values, rejudge } = parsed.data;
  let saved;
  try {
    const member = await authorizeMember(workspace, 'maintainer');
    saved = await saveCasePolicy(member, { projectSlug: project, caseName, values, rejudge: rejudge ?? false });
  } catch (err) {
    return refusal(err);
  }
  revalidatePath(`/w/${workspace}/projects/${project}/cases/${caseName}`);
  if (saved.rejudged) revalidatePath(`/w/${workspace}/runs/${saved.rejudged.runId}`);
  const message = saved.rejudged
    ? `Policy saved. The latest run was re-judged: ${saved.rejudged.before ?? 'no verdict'} → ${saved.rejudged.after}.`
    : 'Policy saved. It applies to the next run of this case.';
  return { ok: true, message, rejudged: saved.rejudged };
}
