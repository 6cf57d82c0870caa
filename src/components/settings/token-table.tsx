'use client';

import { useActionState } from 'react';
import { Button } from '../ui/button';
import { Card } from '../ui/card';
import type { SettingsAction, SettingsFormState } from './action-state';
import { RowMessage, SettingsTable, Td, Th } from './table';

export interface TokenListItem {
  id: string;
  name: string;
  prefix: string;
  project: string;
  createdBy: string | null;
  created: string;
  lastUsed: string;
  /** When it was revoked, or null while it works. */
  revoked: string | null;
}

export type TokenTableProps = { workspace: string; tokens: TokenListItem[]; revoke: SettingsAction };

const initial: SettingsFormState = {};

export function TokenTable({ workspace, tokens, revoke }: TokenTableProps) {
  return (
    <Card title={`Tokens (${tokens.filter((t) => !t.revoked).length} active)`}>
      {tokens.length === 0 ? (
        <p className="text-sm text-slate-500">No token yet.</p>
      ) : (
        <SettingsTable
          caption="CI tokens of this workspace"
          head={
            <>
              <Th>Name</Th>
              <Th>Project</Th>
              <Th>Prefix</Th>
              <Th>Created by</Th>
              <Th>Created</Th>
              <Th>Last used</Th>
              <Th className="text-right">Status</Th>
            </>
          }
        >
          {tokens.map((t) => (
            <tr key={t.id} data-testid="token-row" className={t.revoked ? 'text-slate-400' : undefined}>
              <Td>{t.name}</Td>
              <Td className="font-mono text-xs">{t.project}</Td>
              <Td className="font-mono text-xs" data-testid="token-prefix">
                {t.prefix}…
              </Td>
              <Td className="font-mono text-xs">{t.createdBy ?? '—'}</Td>
              <Td className="whitespace-nowrap">{t.created}</Td>
              <Td className="whitespace-nowrap">{t.lastUsed}</Td>
              <Td className="text-right">
                {t.revoked ? (
                  <span className="whitespace-nowrap">revoked {t.revoked}</span>
                ) : (
                  <RevokeTokenForm workspace={workspace} token={t} action={revoke} />
                )}
              </Td>
            </tr>
          ))}
        </SettingsTable>
      )}
    </Card>
  );
}

function RevokeTokenForm({
  workspace,
  token,
  action,
}: {
  workspace: string;
  token: TokenListItem;
  action: SettingsAction;
}) {
  const [state, formAction, pending] = useActionState(action, initial);
  return (
    <form action={formAction} aria-label={`Revoke token ${token.name}`} className="inline-block text-left">
      <input type="hidden" name="workspace" value={workspace} />
      <input type="hidden" name="tokenId" value={token.id} />
      <Button type="submit" variant="ghost" disabled={pending}>
        Revoke
      </Button>
      <RowMessage ok={state.ok}>{state.message}</RowMessage>
    </form>
  );
}
