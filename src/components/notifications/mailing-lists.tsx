'use client';

import { useActionState } from 'react';
import { firstError, type SettingsAction, type SettingsFormState } from '../settings/action-state';
import { Button } from '../ui/button';
import { Card } from '../ui/card';
import { Field, SelectField } from '../ui/field';
import { Notice } from '../ui/notice';
import { Checkbox, DAY_NAMES, TimingFields } from './timing-fields';

export type MailingListRow = {
  id: string;
  email: string;
  projectName: string;
  weeklyDigest: boolean;
  failureAlerts: boolean;
  digestDay: number;
  digestHour: number;
  timeZone: string;
};

export type MailingListsProps = {
  workspace: string;
  projects: { id: string; name: string }[];
  lists: MailingListRow[];
  canManage: boolean;
  timeZoneListId: string;
  save: SettingsAction;
  remove: SettingsAction;
};

const initial: SettingsFormState = {};

/** Team addresses subscribed to a project. Everyone sees them; maintainers add and remove them. */
export function MailingLists({
  workspace,
  projects,
  lists,
  canManage,
  timeZoneListId,
  save,
  remove,
}: MailingListsProps) {
  return (
    <Card title="Mailing lists">
      <p className="mb-3 text-sm text-slate-600 dark:text-slate-300">
        A team address receives a project&apos;s mails like a member would. Anyone on the list can stop them with the
        unsubscribe link in a mail; a maintainer can add the address again.
      </p>
      {lists.length === 0 ? (
        <p className="text-sm text-slate-500" data-testid="mailing-lists-empty">
          No mailing list is subscribed.
        </p>
      ) : (
        <table className="mb-4 w-full text-left text-sm" data-testid="mailing-lists">
          <thead className="text-xs uppercase tracking-wide text-slate-500">
            <tr>
              <th className="py-1 pr-3 font-medium">Address</th>
              <th className="py-1 pr-3 font-medium">Project</th>
              <th className="py-1 pr-3 font-medium">Mails</th>
              {canManage ? (
                <th className="py-1 font-medium">
                  <span className="sr-only">Actions</span>
                </th>
              ) : null}
            </tr>
          </thead>
          <tbody>
            {lists.map((l) => (
              <tr key={l.id} className="border-t border-slate-100 dark:border-slate-800">
                <td className="py-1.5 pr-3 font-mono text-xs">{l.email}</td>
                <td className="py-1.5 pr-3">{l.projectName}</td>
                <td className="py-1.5 pr-3 text-slate-600 dark:text-slate-300">{describe(l)}</td>
                {canManage ? (
                  <td className="py-1.5 text-right">
                    <RemoveButton workspace={workspace} id={l.id} email={l.email} remove={remove} />
                  </td>
                ) : null}
              </tr>
            ))}
          </tbody>
        </table>
      )}
      {canManage && projects.length > 0 ? (
        <AddForm workspace={workspace} projects={projects} timeZoneListId={timeZoneListId} save={save} />
      ) : null}
      {!canManage ? <p className="text-xs text-slate-500">Maintainers manage mailing lists.</p> : null}
    </Card>
  );
}

function describe(l: MailingListRow): string {
  const parts: string[] = [];
  if (l.weeklyDigest)
    parts.push(`digest ${DAY_NAMES[l.digestDay] ?? ''} ${String(l.digestHour).padStart(2, '0')}:00 ${l.timeZone}`);
  if (l.failureAlerts) parts.push('failure alerts');
  return parts.length > 0 ? parts.join(' · ') : 'off';
}

function RemoveButton({
  workspace,
  id,
  email,
  remove,
}: {
  workspace: string;
  id: string;
  email: string;
  remove: SettingsAction;
}) {
  const [state, action, pending] = useActionState(remove, initial);
  return (
    <form action={action} className="inline">
      <input type="hidden" name="workspace" value={workspace} />
      <input type="hidden" name="subscriptionId" value={id} />
      {state.message && !state.ok ? <span className="mr-2 text-xs text-verdict-fail">{state.message}</span> : null}
      <Button type="submit" variant="ghost" disabled={pending} aria-label={`Remove ${email}`}>
        Remove
      </Button>
    </form>
  );
}

function AddForm({
  workspace,
  projects,
  timeZoneListId,
  save,
}: {
  workspace: string;
  projects: { id: string; name: string }[];
  timeZoneListId: string;
  save: SettingsAction;
}) {
  const [state, action, pending] = useActionState(save, initial);
  const v = state.ok ? undefined : state.values;
  return (
    <form
      action={action}
      aria-label="Subscribe a mailing list"
      className="space-y-3 border-t border-slate-200 pt-3 dark:border-slate-800"
    >
      <input type="hidden" name="workspace" value={workspace} />
      {state.message ? <Notice tone={state.ok ? 'success' : 'error'}>{state.message}</Notice> : null}
      {/* Remount after each answer so the selects show the values given back (React resets forms). */}
      <div key={JSON.stringify(state)} className="space-y-3">
        <div className="grid gap-3 sm:grid-cols-2">
          <SelectField
            label="Project"
            name="projectId"
            id="list-project"
            defaultValue={v?.projectId ?? projects[0]!.id}
            error={firstError(state, 'projectId')}
          >
            {projects.map((p) => (
              <option key={p.id} value={p.id}>
                {p.name}
              </option>
            ))}
          </SelectField>
          <Field
            label="Address"
            name="email"
            id="list-email"
            type="email"
            required
            placeholder="solver-team@example.com"
            defaultValue={v?.email}
            error={firstError(state, 'email')}
          />
        </div>
        <Checkbox
          id="list-digest"
          name="weeklyDigest"
          label="Weekly digest"
          defaultChecked={v ? v.weeklyDigest === 'on' : true}
        />
        <TimingFields
          idPrefix="list"
          day={v?.digestDay !== undefined ? Number(v.digestDay) : 1}
          hour={v?.digestHour !== undefined ? Number(v.digestHour) : 8}
          timeZone={v?.timeZone ?? 'UTC'}
          preferBrowserZone={!v}
          timeZoneListId={timeZoneListId}
          errors={{
            digestDay: firstError(state, 'digestDay'),
            digestHour: firstError(state, 'digestHour'),
            timeZone: firstError(state, 'timeZone'),
          }}
        />
        <Checkbox
          id="list-alerts"
          name="failureAlerts"
          label="Failure alerts"
          defaultChecked={v ? v.failureAlerts === 'on' : false}
        />
      </div>
      <Button type="submit" disabled={pending}>
        {pending ? 'Subscribing…' : 'Subscribe the address'}
      </Button>
    </form>
  );
}
