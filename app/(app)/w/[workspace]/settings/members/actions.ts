'use server';

import { revalidatePath } from 'next/cache';
import { redirect } from 'next/navigation';
import { z } from 'zod';
import type { SettingsFormState } from '@/src/components/settings/action-state';
import { ROLES } from '@/src/server/auth/roles';
import { authorizeMember } from '@/src/server/auth/session';
import { AppError } from '@/src/server/errors';
import {
  changeMemberRole,
  inviteToWorkspace,
  removeMember,
  revokeWorkspaceInvitation,
} from '@/src/server/services/members';
import { slugSchema } from '@/src/schemas/runs';

/**
 * The members page's writes. Each is a public endpoint: it parses its form, checks that the
 * signed-in person is an admin of the workspace named in the form, and only then calls the
 * service (which checks again under a lock and writes the audit event).
 */

const workspace = slugSchema;
const role = z.enum(ROLES, 'Choose a role.');

const changeRoleInput = z.object({ workspace, userId: z.uuid('Unknown member.'), role });
const removeInput = z.object({ workspace, userId: z.uuid('Unknown member.') });
const inviteInput = z.object({ workspace, email: z.email('Enter an e-mail address.').max(320), role });
const revokeInput = z.object({ workspace, invitationId: z.uuid('Unknown invitation.') });

function fields(form: FormData): Record<string, string> {
  const out: Record<string, string> = {};
  for (const [key, value] of form) if (typeof value === 'string') out[key] = value;
  return out;
}

function invalid(error: z.ZodError, values?: Record<string, string>): SettingsFormState {
  return { code: 'invalid:form', fieldErrors: z.flattenError(error).fieldErrors, values };
}

/** A refusal the person can read; anything that is not an AppError is a bug and goes to the error page. */
function refused(err: unknown, values?: Record<string, string>): SettingsFormState {
  if (err instanceof AppError) return { code: err.code, message: err.message, values };
  throw err;
}

const membersPath = (slug: string) => `/w/${slug}/settings/members`;

export async function changeRoleAction(_previous: SettingsFormState, form: FormData): Promise<SettingsFormState> {
  const parsed = changeRoleInput.safeParse(fields(form));
  if (!parsed.success) return invalid(parsed.error);
  try {
    const ctx = await authorizeMember(parsed.data.workspace, 'admin');
    const { changed } = await changeMemberRole(ctx, { userId: parsed.data.userId, role: parsed.data.role });
    revalidatePath(membersPath(ctx.workspace.slug));
    return {
      ok: true,
      code: 'ok',
      message: changed ? `Role changed to ${parsed.data.role}.` : 'The role was already that.',
    };
  } catch (err) {
    return refused(err);
  }
}

export async function removeMemberAction(_previous: SettingsFormState, form: FormData): Promise<SettingsFormState> {
  const parsed = removeInput.safeParse(fields(form));
  if (!parsed.success) return invalid(parsed.error);
  let answer: SettingsFormState;
  let leftWorkspace = false;
  try {
    const ctx = await authorizeMember(parsed.data.workspace, 'admin');
    const { email } = await removeMember(ctx, { userId: parsed.data.userId });
    revalidatePath(membersPath(ctx.workspace.slug));
    leftWorkspace = parsed.data.userId === ctx.user.id;
    answer = { ok: true, code: 'ok', message: `${email} was removed from the workspace.` };
  } catch (err) {
    return refused(err);
  }
  // An admin who left can no longer see this workspace's pages.
  if (leftWorkspace) redirect('/');
  return answer;
}

export async function inviteMemberAction(_previous: SettingsFormState, form: FormData): Promise<SettingsFormState> {
  const values = fields(form);
  const parsed = inviteInput.safeParse(values);
  if (!parsed.success) return invalid(parsed.error, values);
  try {
    const ctx = await authorizeMember(parsed.data.workspace, 'admin');
    const { email } = await inviteToWorkspace(ctx, { email: parsed.data.email, role: parsed.data.role });
    revalidatePath(membersPath(ctx.workspace.slug));
    return {
      ok: true,
      code: 'ok',
      message: `Invitation sent to ${email} as ${parsed.data.role}. The link works once, for 7 days.`,
    };
  } catch (err) {
    return refused(err, values);
  }
}

export async function revokeInvitationAction(_previous: SettingsFormState, form: FormData): Promise<SettingsFormState> {
  const parsed = revokeInput.safeParse(fields(form));
  if (!parsed.success) return invalid(parsed.error);
  try {
    const ctx = await authorizeMember(parsed.data.workspace, 'admin');
    const { email } = await revokeWorkspaceInvitation(ctx, { invitationId: parsed.data.invitationId });
    revalidatePath(membersPath(ctx.workspace.slug));
    return { ok: true, code: 'ok', message: `The invitation for ${email} no longer works.` };
  } catch (err) {
    return refused(err);
  }
}
