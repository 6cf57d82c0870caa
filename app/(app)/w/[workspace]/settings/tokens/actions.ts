'use server';

import { revalidatePath } from 'next/cache';
import { z } from 'zod';
import type { SettingsFormState, TokenFormState } from '@/src/components/settings/action-state';
import { authorizeMember } from '@/src/server/auth/session';
import { AppError } from '@/src/server/errors';
import { createProjectToken, revokeProjectToken } from '@/src/server/services/tokens';
import { slugSchema } from '@/src/schemas/runs';

/**
 * The CI tokens page's writes: maintainers and admins of the workspace named in the form, from a
 * signed-in session (a CI token cannot call these: actions read the session cookie only).
 */

const createInput = z.object({
  workspace: slugSchema,
  projectId: z.uuid('Choose a project.'),
  name: z
    .string()
    .trim()
    .min(1, 'Name the token, e.g. after the CI job that uses it.')
    .max(100, 'At most 100 characters.'),
});
const revokeInput = z.object({ workspace: slugSchema, tokenId: z.uuid('Unknown token.') });

function fields(form: FormData): Record<string, string> {
  const out: Record<string, string> = {};
  for (const [key, value] of form) if (typeof value === 'string') out[key] = value;
  return out;
}

function refused(err: unknown, values?: Record<string, string>): SettingsFormState {
  if (err instanceof AppError) return { code: err.code, message: err.message, values };
  throw err;
}

const tokensPath = (slug: string) => `/w/${slug}/settings/tokens`;

export async function createTokenAction(_previous: TokenFormState, form: FormData): Promise<TokenFormState> {
  const values = fields(form);
  const parsed = createInput.safeParse(values);
  if (!parsed.success) return { code: 'invalid:form', fieldErrors: z.flattenError(parsed.error).fieldErrors, values };
  try {
    const ctx = await authorizeMember(parsed.data.workspace, 'maintainer');
    const issued = await createProjectToken(ctx, { projectId: parsed.data.projectId, name: parsed.data.name });
    revalidatePath(tokensPath(ctx.workspace.slug));
    // The secret travels in this one answer and is never stored or shown again.
    return {
      ok: true,
      code: 'ok',
      message: `Token "${issued.name}" created for ${issued.projectSlug}.`,
      issued: { name: issued.name, prefix: issued.prefix, projectSlug: issued.projectSlug, token: issued.token },
    };
  } catch (err) {
    return refused(err, values);
  }
}

export async function revokeTokenAction(_previous: SettingsFormState, form: FormData): Promise<SettingsFormState> {
  const parsed = revokeInput.safeParse(fields(form));
  if (!parsed.success) return { code: 'invalid:form', fieldErrors: z.flattenError(parsed.error).fieldErrors };
  try {
    const ctx = await authorizeMember(parsed.data.workspace, 'maintainer');
    const { prefix } = await revokeProjectToken(ctx, { tokenId: parsed.data.tokenId });
    revalidatePath(tokensPath(ctx.workspace.slug));
    return { ok: true, code: 'ok', message: `${prefix}… revoked; CI jobs using it now get 401.` };
  } catch (err) {
    return refused(err);
  }
}
