'use client';

import { useActionState } from 'react';
import { Button } from '../ui/button';
import { Card } from '../ui/card';
import { Field, SelectField } from '../ui/field';
import { Notice } from '../ui/notice';
import { firstError, type SettingsAction, type TokenFormState } from './action-state';
import { CopyButton } from './copy-button';

export type TokenCreateFormProps = {
  workspace: string;
  projects: { id: string; slug: string; name: string }[];
  action: SettingsAction<TokenFormState>;
};

const initial: TokenFormState = {};

export function TokenCreateForm({ workspace, projects, action }: TokenCreateFormProps) {
  const [state, formAction, pending] = useActionState(action, initial);
  if (projects.length === 0) {
    return (
      <Card title="Create a token">
        <p className="text-sm text-slate-500">This workspace has no project yet. A token belongs to one project.</p>
      </Card>
    );
  }
  return (
    <Card title="Create a token">
      {state.issued ? <NewSecret issued={state.issued} /> : null}
      <form action={formAction} aria-label="Create a CI token" className="space-y-3">
        <input type="hidden" name="workspace" value={workspace} />
        {state.message && !state.ok ? <Notice tone="error">{state.message}</Notice> : null}
        <div className="grid gap-3 sm:grid-cols-[minmax(14rem,22rem)_1fr_auto] sm:items-end">
          <SelectField
            label="Project"
            name="projectId"
            id="token-project"
            defaultValue={state.values?.projectId ?? projects[0]!.id}
            error={firstError(state, 'projectId')}
          >
            {projects.map((p) => (
              <option key={p.id} value={p.id}>
                {p.name} ({p.slug})
              </option>
            ))}
          </SelectField>
          <Field
            label="Name"
            name="name"
            id="token-name"
            required
            maxLength={100}
            placeholder="nightly build"
            defaultValue={state.values?.name}
            error={firstError(state, 'name')}
          />
          <Button type="submit" disabled={pending}>
            {pending ? 'Creating…' : 'Create token'}
          </Button>
        </div>
      </form>
    </Card>
  );
}

/** The secret, this once. It lives only in this answer's state: a reload or another page drops it. */
function NewSecret({ issued }: { issued: NonNullable<TokenFormState['issued']> }) {
  return (
    <div
      className="mb-4 space-y-2 rounded-md border border-green-200 bg-green-50 p-3 dark:border-green-900 dark:bg-green-950"
      data-testid="new-token"
    >
      <p className="text-sm font-medium">
        Token &ldquo;{issued.name}&rdquo; for {issued.projectSlug}. Copy it now: it will not be shown again.
      </p>
      <div className="flex flex-wrap items-center gap-2">
        <code
          className="select-all break-all rounded bg-white px-2 py-1 font-mono text-xs dark:bg-slate-900"
          data-testid="new-token-secret"
        >
          {issued.token}
        </code>
        <CopyButton text={issued.token} />
      </div>
      <p className="text-xs text-slate-600 dark:text-slate-300">
        Give it to the CI job as <code className="font-mono">VARIGATE_TOKEN</code> from the CI&apos;s secret store,
        never in the repository.
      </p>
    </div>
  );
}
