'use client';

import { useActionState } from 'react';
import type { Role } from '@/src/server/auth/roles';
import { Button } from '../ui/button';
import { Card } from '../ui/card';
import type { SettingsAction, SettingsFormState } from './action-state';
import { RowMessage, SettingsTable, Td, Th } from './table';

export interface InvitationListItem {
  id: string;
  email: string;
  role: Role;
  invitedBy: string | null;
  sent: string;
  expires: string;
}

export type InvitationListProps = { workspace: string; invitations: InvitationListItem[]; revoke: SettingsAction };

const initial: SettingsFormState = {};

export function InvitationList({ workspace, invitations, revoke }: InvitationListProps) {
  return (
    <Card title={`Pending invitations (${invitations.length})`}>
      {invitations.length === 0 ? (
        <p className="text-sm text-slate-500">No invitation is waiting for an answer.</p>
      ) : (
        <SettingsTable
          caption="Invitations not yet accepted"
          head={
            <>
              <Th>E-mail</Th>
              <Th>Role</Th>
              <Th>Invited by</Th>
              <Th>Sent</Th>
              <Th>Expires</Th>
              <Th className="text-right">Revoke</Th>
            </>
          }
        >
          {invitations.map((i) => (
            <tr key={i.id} data-testid="invitation-row">
              <Td className="font-mono text-xs">{i.email}</Td>
              <Td>{i.role}</Td>
              <Td className="font-mono text-xs">{i.invitedBy ?? '—'}</Td>
              <Td className="whitespace-nowrap text-slate-500">{i.sent}</Td>
              <Td className="whitespace-nowrap text-slate-500">{i.expires}</Td>
              <Td className="text-right">
                <RevokeInvitationForm workspace={workspace} invitation={i} action={revoke} />
              </Td>
            </tr>
          ))}
        </SettingsTable>
      )}
    </Card>
  );
}

function RevokeInvitationForm({
  workspace,
  invitation,
  action,
}: {
  workspace: string;
  invitation: InvitationListItem;
  action: SettingsAction;
}) {
  const [state, formAction, pending] = useActionState(action, initial);
  return (
    <form
      action={formAction}
      aria-label={`Revoke the invitation of ${invitation.email}`}
      className="inline-block text-left"
    >
      <input type="hidden" name="workspace" value={workspace} />
      <input type="hidden" name="invitationId" value={invitation.id} />
      <Button type="submit" variant="ghost" disabled={pending}>
        Revoke
      </Button>
      <RowMessage ok={state.ok}>{state.message}</RowMessage>
    </form>
  );
}
