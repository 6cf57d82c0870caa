'use server';

import { AuthError } from 'next-auth';
import { redirect } from 'next/navigation';
import { z } from 'zod';
import { signIn } from '@/src/server/auth/config';
import { getSessionUser } from '@/src/server/auth/session';
import { AppError } from '@/src/server/errors';
import {
  acceptInvitation,
  requestPasswordReset,
  requestSignInLink,
  resetPassword,
} from '@/src/server/services/accounts';

export interface FormState {
  message?: string;
  ok?: boolean;
  fieldErrors?: Record<string, string[] | undefined>;
}

const emailSchema = z.email('Enter an e-mail address.').max(320);

/** Only paths inside the app, so a crafted `next` cannot send people elsewhere. */
function safeNext(value: FormDataEntryValue | null): string {
  const next = typeof value === 'string' ? value : '';
  return next.startsWith('/') && !next.startsWith('//') ? next : '/';
}

function authFailure(err: unknown): FormState {
  if (err instanceof AuthError) {
    const code = (err as AuthError & { code?: string }).code;
    if (code === 'rate_limited')
      return { message: 'Too many failed attempts. Wait 15 minutes, or use a sign-in link.' };
    if (code === 'link') return { message: 'This sign-in link has expired or was already used. Ask for a new one.' };
    return { message: 'Wrong e-mail address or password.' };
  }
  throw err; // Next's redirect after a successful sign-in travels as an exception too.
}

export async function signInWithPassword(_prev: FormState, form: FormData): Promise<FormState> {
  const parsed = z
    .object({ email: emailSchema, password: z.string().min(1, 'Enter your password.').max(200) })
    .safeParse({
      email: form.get('email'),
      password: form.get('password'),
    });
  if (!parsed.success) return { fieldErrors: z.flattenError(parsed.error).fieldErrors };
  try {
    await signIn('password', { ...parsed.data, redirectTo: safeNext(form.get('next')) });
    return {};
  } catch (err) {
    return authFailure(err);
  }
}

export async function signInWithLink(_prev: FormState, form: FormData): Promise<FormState> {
  try {
    await signIn('email-link', { token: String(form.get('token') ?? ''), redirectTo: '/' });
    return {};
  } catch (err) {
    return authFailure(err);
  }
}

export async function askForSignInLink(_prev: FormState, form: FormData): Promise<FormState> {
  const parsed = emailSchema.safeParse(form.get('email'));
  if (!parsed.success) return { fieldErrors: { email: [parsed.error.issues[0]!.message] } };
  await requestSignInLink(parsed.data);
  return {
    ok: true,
    message: 'If an account exists for this address, a sign-in link is on its way. It works once, for 15 minutes.',
  };
}

export async function askForPasswordReset(_prev: FormState, form: FormData): Promise<FormState> {
  const parsed = emailSchema.safeParse(form.get('email'));
  if (!parsed.success) return { fieldErrors: { email: [parsed.error.issues[0]!.message] } };
  await requestPasswordReset(parsed.data);
  return {
    ok: true,
    message: 'If an account exists for this address, a reset link is on its way. It works once, for one hour.',
  };
}

export async function chooseNewPassword(_prev: FormState, form: FormData): Promise<FormState> {
  const password = String(form.get('password') ?? '');
  if (password !== String(form.get('confirm') ?? ''))
    return { fieldErrors: { confirm: ['The two passwords differ.'] } };
  try {
    await resetPassword(String(form.get('token') ?? ''), password);
  } catch (err) {
    if (err instanceof AppError)
      return err.code === 'invalid:password' ? { fieldErrors: { password: [err.message] } } : { message: err.message };
    throw err;
  }
  redirect('/sign-in?reset=1');
}

export async function joinWorkspace(_prev: FormState, form: FormData): Promise<FormState> {
  const token = String(form.get('token') ?? '');
  const user = await getSessionUser();
  let result: { workspaceSlug: string };
  try {
    if (user) {
      result = await acceptInvitation(token, { userId: user.id, email: user.email });
    } else {
      const parsed = z
        .object({
          name: z.string().trim().min(1, 'Enter your name.').max(100),
          password: z.string().max(200),
          confirm: z.string(),
        })
        .safeParse({ name: form.get('name'), password: form.get('password'), confirm: form.get('confirm') });
      if (!parsed.success) return { fieldErrors: z.flattenError(parsed.error).fieldErrors };
      if (parsed.data.password !== parsed.data.confirm)
        return { fieldErrors: { confirm: ['The two passwords differ.'] } };
      const accepted = await acceptInvitation(token, {
        newAccount: { name: parsed.data.name, password: parsed.data.password },
      });
      result = accepted;
      await signIn('password', { email: accepted.email, password: parsed.data.password, redirect: false });
    }
  } catch (err) {
    if (err instanceof AppError)
      return err.code === 'invalid:password' ? { fieldErrors: { password: [err.message] } } : { message: err.message };
    throw err;
  }
  redirect(`/w/${result.workspaceSlug}`);
}
