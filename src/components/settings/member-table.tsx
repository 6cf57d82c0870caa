'use client';

import { useActionState, useState } from 'react';
import type { Role } from '@/src/server/auth/roles';
import { Button } from '../ui/button';
import { Card } from '../ui/card';
import type { SettingsAction, SettingsFormState } from './action-state';
import { RowMessage, SettingsTable, Td, Th } from './table';

export interface MemberListItem {
  userId: string;
  name: string | null;
  email: string;
  role: Role;
  joined: string;
}

export type MemberTableProps = {
  workspace: string;
  members: MemberListItem[];
  currentUserId: string;
  /** Admins see the controls; the actions refuse everyone else regardless. */
  canManage: boolean;
  changeRole: SettingsAction;
  remove: SettingsAction;
};

const initial: SettingsFormState = {};
const ROLE_CHOICES: Role[] = ['viewer', 'maintainer', 'admin'];

export function MemberTable({ workspace, members, currentUserId, canManage, changeRole, remove }: MemberTableProps) {
  return (
    <Card title={`Members (${members.length})`}>
      <SettingsTable
        caption="Members of this workspace"
        head={
          <>
            <Th>Name</Th>
            <Th>E-mail</Th>
            <Th>Role</Th>
            <Th>Joined</Th>
            {canManage ? <Th className="text-right">Remove</Th> : null}
          </>
        }
      >
        {members.map((m) => (
          <tr key={m.userId} data-testid="member-row">
            <Td>
              {m.name ?? '—'}
              {m.userId === currentUserId ? <span className="ml-1 text-xs text-slate-500">(you)</span> : null}
            </Td>
            <Td className="font-mono text-xs">{m.email}</Td>
            <Td>{canManage ? <RoleForm workspace={workspace} member={m} action={changeRole} /> : m.role}</Td>
            <Td className="whitespace-nowrap text-slate-500">{m.joined}</Td>
            {canManage ? (
              <Td className="text-right">
                <RemoveForm workspace={workspace} member={m} self={m.userId === currentUserId} action={remove} />
              </Td>
            ) : null}
          </tr>
        ))}
      </SettingsTable>
    </Card>
  );
}

function RoleForm({
  workspace,
  member,
  action,
}: {
  workspace: string;
  member: MemberListItem;
  action: SettingsAction;
}) {
  const [state, formAction, pending] = useActionState(action, initial);
  return (
    <form action={formAction} aria-label={`Role of ${member.email}`}>
      <input type="hidden" name="workspace" value={workspace} />
      <input type="hidden" name="userId" value={member.userId} />
      <div className="flex items-center gap-2">
        <select
          name="role"
          defaultValue={member.role}
          aria-label={`Role of ${member.email}`}
          className="rounded-md border border-slate-300 bg-white px-2 py-1 text-sm dark:border-slate-700 dark:bg-slate-900"
        >
          {ROLE_CHOICES.map((r) => (
            <option key={r} value={r}>
              {r}
            </option>
          ))}
        </select>
        <Button type="submit" variant="secondary" disabled={pending}>
          {pending ? 'Saving…' : 'Save'}
        </Button>
      </div>
      <RowMessage ok={state.ok}>{state.message ?? state.fieldErrors?.role?.[0]}</RowMessage>
    </form>
  );
}

/** Removal takes a second click, so a stray one does not lock somebody out. */
function RemoveForm({
  workspace,
  member,
  self,
  action,
}: {
  workspace: string;
  member: MemberListItem;
  self: boolean;
  action: SettingsAction;
}) {
  const [state, formAction, pending] = useActionState(action, initial);
  const [confirming, setConfirming] = useState(false);
  const label = self ? 'Leave' : 'Remove';
  return (
    <form action={formAction} aria-label={`Remove ${member.email}`} className="inline-block text-left">
      <input type="hidden" name="workspace" value={workspace} />
      <input type="hidden" name="userId" value={member.userId} />
      {confirming ? (
        <span className="flex items-center gap-2">
          <Button type="submit" variant="danger" disabled={pending}>
            {self ? 'Leave the workspace' : `Remove ${member.email}`}
          </Button>
          <Button variant="ghost" onClick={() => setConfirming(false)}>
            Cancel
          </Button>
        </span>
      ) : (
        <Button variant="ghost" onClick={() => setConfirming(true)}>
          {label}…
        </Button>
      )}
      <RowMessage ok={state.ok}>{state.message}</RowMessage>
    </form>
  );
}
