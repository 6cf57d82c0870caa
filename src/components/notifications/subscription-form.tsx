'use client';

import { useActionState } from 'react';
import { firstError, type SettingsAction, type SettingsFormState } from '../settings/action-state';
import { Button } from '../ui/button';
import { Card } from '../ui/card';
import { Notice } from '../ui/notice';
import { Checkbox, TimingFields } from './timing-fields';

export type SubscriptionFormProps = {
  workspace: string;
  project: { id: string; slug: string; name: string; defaultBranch: string };
  /** The member's saved settings, or null when they never saved any (= off). */
  current: {
    weeklyDigest: boolean;
    failureAlerts: boolean;
    digestDay: number;
    digestHour: number;
    timeZone: string;
  } | null;
  timeZoneListId: string;
  save: SettingsAction;
  preview: SettingsAction;
};

const initial: SettingsFormState = {};

/** One project's mails for the signed-in member: weekly digest (day, hour, zone), failure alerts, a preview. */
export function SubscriptionForm({
  workspace,
  project,
  current,
  timeZoneListId,
  save,
  preview,
}: SubscriptionFormProps) {
  const [state, saveAction, saving] = useActionState(save, initial);
  const [previewState, previewAction, sending] = useActionState(preview, initial);
  const v = state.values;
  const settings = {
    weeklyDigest: v ? v.weeklyDigest === 'on' : (current?.weeklyDigest ?? false),
    failureAlerts: v ? v.failureAlerts === 'on' : (current?.failureAlerts ?? false),
    digestDay: v?.digestDay !== undefined ? Number(v.digestDay) : (current?.digestDay ?? 1),
    digestHour: v?.digestHour !== undefined ? Number(v.digestHour) : (current?.digestHour ?? 8),
    timeZone: v?.timeZone ?? current?.timeZone ?? 'UTC',
  };
  const idPrefix = `sub-${project.id}`;
  // React resets a form after its action; selects keep no memory of new defaults, so remount the
  // fields whenever the saved settings or the action's answer change.
  const fieldsKey = JSON.stringify([current, state]);
  const off = current !== null && !current.weeklyDigest && !current.failureAlerts;
  return (
    <Card
      title={project.name}
      actions={<span className="text-xs text-slate-500">{off || current === null ? 'off' : describe(current)}</span>}
    >
      <form
        action={saveAction}
        aria-label={`Mail about ${project.name}`}
        className="space-y-3"
        data-testid={`subscription-${project.slug}`}
      >
        <input type="hidden" name="workspace" value={workspace} />
        <input type="hidden" name="projectId" value={project.id} />
        {state.message ? <Notice tone={state.ok ? 'success' : 'error'}>{state.message}</Notice> : null}
        <div key={fieldsKey} className="space-y-3">
          <Checkbox
            id={`${idPrefix}-digest`}
            name="weeklyDigest"
            label="Weekly digest"
            defaultChecked={settings.weeklyDigest}
            hint={`Builds of the week on ${project.defaultBranch}, pass rate and its change, cases that started failing or were fixed, the longest failing case.`}
          />
          <TimingFields
            idPrefix={idPrefix}
            day={settings.digestDay}
            hour={settings.digestHour}
            timeZone={settings.timeZone}
            preferBrowserZone={current === null && !v}
            timeZoneListId={timeZoneListId}
            errors={{
              digestDay: firstError(state, 'digestDay'),
              digestHour: firstError(state, 'digestHour'),
              timeZone: firstError(state, 'timeZone'),
            }}
          />
          <Checkbox
            id={`${idPrefix}-alerts`}
            name="failureAlerts"
            label="Failure alerts"
            defaultChecked={settings.failureAlerts}
            hint={`A mail as soon as a case goes from passing to failing on ${project.defaultBranch}; one per build, and not again while it keeps failing.`}
          />
        </div>
        <div className="flex flex-wrap items-center gap-2">
          <Button type="submit" disabled={saving}>
            {saving ? 'Saving…' : 'Save'}
          </Button>
          <span className="text-xs text-slate-500">Leave both unticked to receive nothing about this project.</span>
        </div>
      </form>
      <form action={previewAction} className="mt-4 space-y-2 border-t border-slate-200 pt-3 dark:border-slate-800">
        <input type="hidden" name="workspace" value={workspace} />
        <input type="hidden" name="projectId" value={project.id} />
        <input type="hidden" name="timeZone" value={current?.timeZone ?? ''} />
        {previewState.message ? (
          <Notice tone={previewState.ok ? 'success' : 'error'}>{previewState.message}</Notice>
        ) : null}
        <Button type="submit" variant="secondary" disabled={sending}>
          {sending ? 'Sending…' : 'Send me a preview now'}
        </Button>
      </form>
    </Card>
  );
}

const DAYS = ['Sundays', 'Mondays', 'Tuesdays', 'Wednesdays', 'Thursdays', 'Fridays', 'Saturdays'];

function describe(s: NonNullable<SubscriptionFormProps['current']>): string {
  const parts: string[] = [];
  if (s.weeklyDigest)
    parts.push(`digest ${DAYS[s.digestDay] ?? ''} ${String(s.digestHour).padStart(2, '0')}:00 ${s.timeZone}`);
  if (s.failureAlerts) parts.push('alerts');
  return parts.join(' · ');
}
