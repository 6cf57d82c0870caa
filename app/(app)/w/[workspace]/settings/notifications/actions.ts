'use server';

import { revalidatePath } from 'next/cache';
import { z } from 'zod';
import type { SettingsFormState } from '@/src/components/settings/action-state';
import {
  digestPreviewSchema,
  mailingListSchema,
  mySubscriptionSchema,
  removeMailingListSchema,
} from '@/src/schemas/notifications';
import { slugSchema } from '@/src/schemas/runs';
import { authorizeMember } from '@/src/server/auth/session';
import { AppError } from '@/src/server/errors';
import {
  memberFrom,
  removeMailingList,
  saveMailingList,
  saveMySubscription,
  sendMyDigestPreview,
} from '@/src/server/services/notifications';

/**
 * Writes of the notification settings page. Each action is a public endpoint: it parses the form,
 * checks the session and the role itself (viewer for one's own subscription and previews,
 * maintainer for mailing lists), then calls the service, which checks that every id belongs to
 * the workspace.
 */

const withWorkspace = { workspace: slugSchema };

function fields(form: FormData): Record<string, string> {
  const out: Record<string, string> = {};
  for (const [key, value] of form) if (typeof value === 'string') out[key] = value;
  return out;
}

function refused(err: unknown, values?: Record<string, string>): SettingsFormState {
  if (err instanceof AppError) return { code: err.code, message: err.message, values };
  throw err;
}

const settingsPath = (slug: string) => `/w/${slug}/settings/notifications`;

export async function saveMySubscriptionAction(
  _previous: SettingsFormState,
  form: FormData,
): Promise<SettingsFormState> {
  const values = fields(form);
  const parsed = mySubscriptionSchema.extend(withWorkspace).safeParse(values);
  if (!parsed.success) return { code: 'invalid:form', fieldErrors: z.flattenError(parsed.error).fieldErrors, values };
  try {
    const ctx = await authorizeMember(parsed.data.workspace, 'viewer');
    const saved = await saveMySubscription(memberFrom(ctx), parsed.data);
    revalidatePath(settingsPath(ctx.workspace.slug));
    const what = [saved.weeklyDigest ? 'weekly digest on' : null, saved.failureAlerts ? 'failure alerts on' : null]
      .filter(Boolean)
      .join(', ');
    return { ok: true, code: 'ok', message: what ? `Saved: ${what}.` : 'Saved: no mail for this project.' };
  } catch (err) {
    return refused(err, values);
  }
}

export async function sendPreviewAction(_previous: SettingsFormState, form: FormData): Promise<SettingsFormState> {
  const values = fields(form);
  const parsed = digestPreviewSchema.extend(withWorkspace).safeParse(values);
  if (!parsed.success) return { code: 'invalid:form', fieldErrors: z.flattenError(parsed.error).fieldErrors, values };
  try {
    const ctx = await authorizeMember(parsed.data.workspace, 'viewer');
    await sendMyDigestPreview(memberFrom(ctx), {
      projectId: parsed.data.projectId,
      timeZone: parsed.data.timeZone || undefined,
    });
    revalidatePath(settingsPath(ctx.workspace.slug));
    return { ok: true, code: 'ok', message: `A preview of this week's digest is on its way to ${ctx.user.email}.` };
  } catch (err) {
    return refused(err, values);
  }
}

export async function saveMailingListAction(_previous: SettingsFormState, form: FormData): Promise<SettingsFormState> {
  const values = fields(form);
  const parsed = mailingListSchema.extend(withWorkspace).safeParse(values);
  if (!parsed.success) return { code: 'invalid:form', fieldErrors: z.flattenError(parsed.error).fieldErrors, values };
  try {
    const ctx = await authorizeMember(parsed.data.workspace, 'maintainer');
    const saved = await saveMailingList(memberFrom(ctx), parsed.data);
    revalidatePath(settingsPath(ctx.workspace.slug));
    return { ok: true, code: 'ok', message: `${saved.email} is subscribed.` };
  } catch (err) {
    return refused(err, values);
  }
}

export async function removeMailingListAction(
  _previous: SettingsFormState,
  form: FormData,
): Promise<SettingsFormState> {
  const parsed = removeMailingListSchema.extend(withWorkspace).safeParse(fields(form));
  if (!parsed.success) return { code: 'invalid:form', fieldErrors: z.flattenError(parsed.error).fieldErrors };
  try {
    const ctx = await authorizeMember(parsed.data.workspace, 'maintainer');
    await removeMailingList(memberFrom(ctx), parsed.data.subscriptionId);
    revalidatePath(settingsPath(ctx.workspace.slug));
    return { ok: true, code: 'ok', message: 'Mailing list removed.' };
  } catch (err) {
    return refused(err);
  }
}
