'use client';

import { useActionState } from 'react';
import type { Role } from '@/src/server/auth/roles';
import { Button } from '../ui/button';
import { Card } from '../ui/card';
import { Field, SelectField } from '../ui/field';
import { Notice } from '../ui/notice';
import { firstError, type SettingsAction, type SettingsFormState } from './action-state';

export type InviteFormProps = { workspace: string; action: SettingsAction; roleDescriptions: Record<Role, string> };

const initial: SettingsFormState = {};

export function InviteForm({ workspace, action, roleDescriptions }: InviteFormProps) {
  const [state, formAction, pending] = useActionState(action, initial);
  return (
    <Card title="Invite someone">
      <form action={formAction} aria-label="Invite a member" className="space-y-3">
        <input type="hidden" name="workspace" value={workspace} />
        {state.message ? <Notice tone={state.ok ? 'success' : 'error'}>{state.message}</Notice> : null}
        <div className="grid gap-3 sm:grid-cols-[1fr_12rem_auto] sm:items-end">
          <Field
            label="E-mail"
            name="email"
            id="invite-email"
            type="email"
            autoComplete="off"
            required
            defaultValue={state.values?.email}
            error={firstError(state, 'email')}
          />
          <SelectField
            label="Role"
            name="role"
            id="invite-role"
            defaultValue={state.values?.role ?? 'viewer'}
            error={firstError(state, 'role')}
          >
            {(Object.keys(roleDescriptions) as Role[]).map((r) => (
              <option key={r} value={r}>
                {r}
              </option>
            ))}
          </SelectField>
          <Button type="submit" disabled={pending}>
            {pending ? 'Sending…' : 'Send invitation'}
          </Button>
        </div>
        <p className="text-xs text-slate-500">The invited person gets a link by e-mail that works once, for 7 days.</p>
      </form>
    </Card>
  );
}
