'use client';

import Link from 'next/link';
import { useActionState } from 'react';
import { Button } from '@/src/components/ui/button';
import { Field } from '@/src/components/ui/field';
import { Notice } from '@/src/components/ui/notice';
import {
  askForPasswordReset,
  askForSignInLink,
  chooseNewPassword,
  joinWorkspace,
  signInWithLink,
  signInWithPassword,
  type FormState,
} from '../actions';

const initial: FormState = {};
const err = (s: FormState, name: string) => s.fieldErrors?.[name]?.[0];

export function PasswordSignInForm({ next }: { next: string }) {
  const [state, action, pending] = useActionState(signInWithPassword, initial);
  return (
    <form action={action} className="space-y-4" aria-label="Sign in with password">
      <input type="hidden" name="next" value={next} />
      {state.message ? <Notice tone="error">{state.message}</Notice> : null}
      <Field label="E-mail" name="email" type="email" autoComplete="username" required error={err(state, 'email')} />
      <Field
        label="Password"
        name="password"
        type="password"
        autoComplete="current-password"
        required
        error={err(state, 'password')}
      />
      <div className="flex items-center justify-between">
        <Button type="submit" disabled={pending}>
          {pending ? 'Signing in…' : 'Sign in'}
        </Button>
        <Link href="/reset" className="text-sm text-sky-700 hover:underline dark:text-sky-400">
          Forgot your password?
        </Link>
      </div>
    </form>
  );
}

export function SignInLinkForm() {
  const [state, action, pending] = useActionState(askForSignInLink, initial);
  return (
    <form action={action} className="space-y-3" aria-label="E-mail me a sign-in link">
      {state.message ? <Notice tone={state.ok ? 'success' : 'error'}>{state.message}</Notice> : null}
      <Field
        label="E-mail"
        name="email"
        id="link-email"
        type="email"
        autoComplete="email"
        required
        error={err(state, 'email')}
      />
      <Button type="submit" variant="secondary" disabled={pending}>
        E-mail me a sign-in link
      </Button>
    </form>
  );
}

export function ConfirmLinkForm({ token }: { token: string }) {
  const [state, action, pending] = useActionState(signInWithLink, initial);
  return (
    <form action={action} className="space-y-4">
      <input type="hidden" name="token" value={token} />
      {state.message ? <Notice tone="error">{state.message}</Notice> : null}
      <Button type="submit" disabled={pending}>
        Sign in to Varigate
      </Button>
    </form>
  );
}

export function ResetRequestForm() {
  const [state, action, pending] = useActionState(askForPasswordReset, initial);
  return (
    <form action={action} className="space-y-4">
      {state.message ? <Notice tone={state.ok ? 'success' : 'error'}>{state.message}</Notice> : null}
      <Field label="E-mail" name="email" type="email" autoComplete="email" required error={err(state, 'email')} />
      <Button type="submit" disabled={pending}>
        Send a reset link
      </Button>
    </form>
  );
}

export function NewPasswordForm({ token }: { token: string }) {
  const [state, action, pending] = useActionState(chooseNewPassword, initial);
  return (
    <form action={action} className="space-y-4">
      <input type="hidden" name="token" value={token} />
      {state.message ? <Notice tone="error">{state.message}</Notice> : null}
      <Field
        label="New password"
        name="password"
        type="password"
        autoComplete="new-password"
        required
        minLength={12}
        hint="At least 12 characters; not a common password."
        error={err(state, 'password')}
      />
      <Field
        label="Repeat it"
        name="confirm"
        type="password"
        autoComplete="new-password"
        required
        error={err(state, 'confirm')}
      />
      <Button type="submit" disabled={pending}>
        Save the new password
      </Button>
    </form>
  );
}

export function JoinForm({ token, needsAccount, email }: { token: string; needsAccount: boolean; email: string }) {
  const [state, action, pending] = useActionState(joinWorkspace, initial);
  return (
    <form action={action} className="space-y-4">
      <input type="hidden" name="token" value={token} />
      {state.message ? <Notice tone="error">{state.message}</Notice> : null}
      {needsAccount ? (
        <>
          <Field label="E-mail" name="email-shown" value={email} readOnly disabled />
          <Field label="Your name" name="name" autoComplete="name" required error={err(state, 'name')} />
          <Field
            label="Password"
            name="password"
            type="password"
            autoComplete="new-password"
            required
            minLength={12}
            hint="At least 12 characters; not a common password."
            error={err(state, 'password')}
          />
          <Field
            label="Repeat the password"
            name="confirm"
            type="password"
            autoComplete="new-password"
            required
            error={err(state, 'confirm')}
          />
        </>
      ) : null}
      <Button type="submit" disabled={pending}>
        {needsAccount ? 'Create my account and join' : 'Join the workspace'}
      </Button>
    </form>
  );
}
