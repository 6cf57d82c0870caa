'use client';

import { startTransition, useActionState, useEffect, useRef, useState, type FormEvent } from 'react';
import { z } from 'zod';
import { DEFAULT_POLICY } from '@/src/analysis/policy';
import { Button } from '@/src/components/ui/button';
import { Field } from '@/src/components/ui/field';
import { Notice } from '@/src/components/ui/notice';
import {
  projectSettingsInputSchema,
  validatePolicyForm,
  type FieldErrors,
  type PolicyFormValues,
} from '@/src/schemas/policy-form';
import type { PolicySaveState } from './policy-form-state';
import { PolicyFields } from './policy-fields';
import { PolicyHelp } from './policy-help';

export type ProjectSettingsFormProps = {
  workspace: string;
  project: string;
  initialName: string;
  initialDefaultBranch: string;
  /** The project's stored default policy, as form values. */
  initialValues: PolicyFormValues;
  saveAction: (input: unknown) => Promise<PolicySaveState>;
};

const detailsSchema = projectSettingsInputSchema.pick({ name: true, defaultBranch: true });

/** Client-side check with the same schemas the action uses; errors keyed like the fields. */
function checkSettings(name: string, defaultBranch: string, values: PolicyFormValues): FieldErrors {
  const errors: FieldErrors = {};
  const details = detailsSchema.safeParse({ name, defaultBranch });
  if (!details.success) Object.assign(errors, z.flattenError(details.error).fieldErrors);
  const policy = validatePolicyForm(values, {});
  if (!policy.ok) Object.assign(errors, policy.fieldErrors);
  return errors;
}

/** Project settings for maintainers: name, default branch and the default policy of its cases. */
export function ProjectSettingsForm({
  workspace,
  project,
  initialName,
  initialDefaultBranch,
  initialValues,
  saveAction,
}: ProjectSettingsFormProps) {
  const [name, setName] = useState(initialName);
  const [defaultBranch, setDefaultBranch] = useState(initialDefaultBranch);
  const [values, setValues] = useState(initialValues);
  const [clientErrors, setClientErrors] = useState<FieldErrors>({});
  const [refusedAttempts, setRefusedAttempts] = useState(0);
  const formRef = useRef<HTMLFormElement>(null);
  const [state, requestSave, pending] = useActionState(
    async (_prev: PolicySaveState, input: unknown) => saveAction(input),
    {},
  );
  const errors: FieldErrors = { ...(state.fieldErrors ?? {}), ...clientErrors };

  useEffect(() => {
    if (refusedAttempts > 0) formRef.current?.querySelector<HTMLElement>('[aria-invalid="true"]')?.focus();
  }, [refusedAttempts]);

  const onSubmit = (e: FormEvent) => {
    e.preventDefault();
    const found = checkSettings(name, defaultBranch, values);
    setClientErrors(found);
    if (Object.keys(found).length > 0) {
      setRefusedAttempts((n) => n + 1);
      return;
    }
    startTransition(() => requestSave({ workspace, project, name, defaultBranch, values }));
  };

  return (
    <form ref={formRef} onSubmit={onSubmit} aria-label="Project settings" noValidate className="space-y-6">
      <div className="grid gap-4 sm:grid-cols-2">
        <Field
          label="Name"
          name="name"
          value={name}
          onChange={(e) => setName(e.target.value)}
          error={errors.name?.[0]}
          required
          maxLength={100}
        />
        <Field
          label="Default branch"
          name="defaultBranch"
          value={defaultBranch}
          onChange={(e) => setDefaultBranch(e.target.value)}
          error={errors.defaultBranch?.[0]}
          hint="Trends and the overview follow this branch; runs on a branch without a baseline are compared with this branch's."
          required
        />
      </div>
      <section aria-labelledby="default-policy-title" className="space-y-3">
        <h2 id="default-policy-title" className="text-base font-semibold">
          Default policy
        </h2>
        <PolicyHelp level="project" readOnly={false} />
        <PolicyFields
          level="project"
          values={values}
          onChange={setValues}
          inherited={DEFAULT_POLICY}
          errors={errors}
          readOnly={false}
        />
      </section>
      {state.message ? <Notice tone={state.ok ? 'success' : 'error'}>{state.message}</Notice> : null}
      <Button type="submit" disabled={pending}>
        {pending ? 'Saving…' : 'Save settings'}
      </Button>
    </form>
  );
}
