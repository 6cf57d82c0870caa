'use client';

import {
  startTransition,
  useActionState,
  useEffect,
  useMemo,
  useRef,
  useState,
  type FormEvent,
  type RefObject,
} from 'react';
import { Button } from '@/src/components/ui/button';
import { Notice } from '@/src/components/ui/notice';
import { VerdictBadge } from '@/src/components/ui/verdict-badge';
import {
  inheritedPolicy,
  validatePolicyForm,
  type FieldErrors,
  type PolicyFormValues,
} from '@/src/schemas/policy-form';
import type { PolicyPreviewState, PolicyPreviewView, PolicySaveState } from './policy-form-state';
import { PolicyFields } from './policy-fields';
import { PolicyHelp } from './policy-help';

export type CasePolicyFormProps = {
  workspace: string;
  project: string;
  caseName: string;
  /** The case's stored settings, as form values. */
  initialValues: PolicyFormValues;
  /** The project's default policy (partial), which the case's settings sit on. */
  projectPolicy: unknown;
  readOnly: boolean;
  /** The case's latest analysed run, which a preview and a re-judge use; null when there is none. */
  latestRun: { id: string; buildKey: string; branch: string; verdict: string | null } | null;
  previewAction: (input: unknown) => Promise<PolicyPreviewState>;
  saveAction: (input: unknown) => Promise<PolicySaveState>;
};

type CaseInput = { workspace: string; project: string; case: string; values: PolicyFormValues; rejudge?: boolean };
/** Answers remember which values they were for, so an answer about older values is not shown. */
type Keyed<T> = T & { key?: string };

const keyOf = (values: PolicyFormValues) => JSON.stringify(values);

/**
 * After a refused attempt, focuses the first field marked invalid, so keyboard and screen-reader
 * users land on it (only then: never while someone is typing).
 */
function useFocusFirstError(attempt: number, container: RefObject<HTMLElement | null>) {
  useEffect(() => {
    if (attempt > 0) container.current?.querySelector<HTMLElement>('[aria-invalid="true"]')?.focus();
  }, [attempt, container]);
}

/**
 * The case's policy form. Maintainers edit it; "Preview and save" first re-judges the latest
 * analysed run with the candidate policy (nothing stored) and shows the verdict it would get; the
 * save that follows can re-judge that run for real. Viewers see the same fields, read-only.
 */
export function CasePolicyForm(props: CasePolicyFormProps) {
  const { workspace, project, caseName, initialValues, projectPolicy, readOnly, latestRun } = props;
  const [values, setValues] = useState(initialValues);
  const [clientErrors, setClientErrors] = useState<FieldErrors>({});
  const [checked, setChecked] = useState(false);
  const [refusedAttempts, setRefusedAttempts] = useState(0);
  const [rejudge, setRejudge] = useState(true);
  const formRef = useRef<HTMLFormElement>(null);
  const previewRef = useRef<HTMLDivElement>(null);
  const inherited = useMemo(() => inheritedPolicy(projectPolicy), [projectPolicy]);
  const key = keyOf(values);

  const [preview, requestPreview, previewPending] = useActionState(
    async (_prev: Keyed<PolicyPreviewState>, input: CaseInput): Promise<Keyed<PolicyPreviewState>> => ({
      ...(await props.previewAction(input)),
      key: keyOf(input.values),
    }),
    {},
  );
  const [saved, requestSave, savePending] = useActionState(
    async (_prev: Keyed<PolicySaveState>, input: CaseInput): Promise<Keyed<PolicySaveState>> => ({
      ...(await props.saveAction(input)),
      key: keyOf(input.values),
    }),
    {},
  );

  const savedNow = saved.key === key && saved.ok === true;
  const previewNow = preview.key === key && preview.previewed === true && !savedNow;
  const serverErrors =
    (preview.key === key ? preview.fieldErrors : undefined) ??
    (saved.key === key ? saved.fieldErrors : undefined) ??
    {};
  const errors: FieldErrors = { ...serverErrors, ...clientErrors };
  const problem =
    preview.key === key && preview.message && !preview.previewed
      ? preview.message
      : saved.key === key && !saved.ok
        ? saved.message
        : undefined;
  useFocusFirstError(refusedAttempts, formRef);

  useEffect(() => {
    if (previewNow) previewRef.current?.focus();
  }, [previewNow]);

  const change = (next: PolicyFormValues) => {
    setValues(next);
    // After a failed attempt, errors follow the edits so a fixed field clears at once.
    if (checked) {
      const result = validatePolicyForm(next, projectPolicy);
      setClientErrors(result.ok ? {} : result.fieldErrors);
    }
  };

  const onSubmit = (e: FormEvent) => {
    e.preventDefault();
    setChecked(true);
    const result = validatePolicyForm(values, projectPolicy);
    if (!result.ok) {
      setClientErrors(result.fieldErrors);
      setRefusedAttempts((n) => n + 1);
      return;
    }
    setClientErrors({});
    startTransition(() => requestPreview({ workspace, project, case: caseName, values }));
  };

  const save = () => {
    const withRun = previewNow && preview.preview != null && rejudge;
    startTransition(() => requestSave({ workspace, project, case: caseName, values, rejudge: withRun }));
  };

  return (
    <form ref={formRef} onSubmit={onSubmit} aria-label="Case policy" noValidate className="space-y-4">
      <PolicyHelp level="case" readOnly={readOnly} />
      <fieldset disabled={readOnly} className="min-w-0">
        <legend className="sr-only">Settings of case {caseName}</legend>
        <PolicyFields
          level="case"
          values={values}
          onChange={change}
          inherited={inherited}
          errors={errors}
          readOnly={readOnly}
        />
      </fieldset>
      {problem ? <Notice tone="error">{problem}</Notice> : null}
      {Object.keys(clientErrors).length > 0 ? (
        <Notice tone="error">Some fields need attention; they are marked above.</Notice>
      ) : null}
      {savedNow && saved.message ? <Notice tone="success">{saved.message}</Notice> : null}
      {readOnly ? null : previewNow ? (
        <div
          ref={previewRef}
          tabIndex={-1}
          role="region"
          aria-label="Preview of the new policy"
          className="space-y-3 rounded-lg border border-sky-300 bg-sky-50 p-4 focus:outline-none dark:border-sky-800 dark:bg-sky-950"
        >
          <PreviewSummary preview={preview.preview ?? null} />
          {preview.preview ? (
            <label className="flex items-center gap-2 text-sm">
              <input
                type="checkbox"
                checked={rejudge}
                onChange={(e) => setRejudge(e.target.checked)}
                className="h-4 w-4"
              />
              Re-judge this run with the new policy when saving
            </label>
          ) : null}
          <div className="flex flex-wrap gap-2">
            <Button type="button" onClick={save} disabled={savePending}>
              {savePending ? 'Saving…' : 'Save policy'}
            </Button>
            <Button
              type="button"
              variant="secondary"
              onClick={() => formRef.current?.querySelector<HTMLElement>('select, input')?.focus()}
            >
              Keep editing
            </Button>
          </div>
        </div>
      ) : (
        <div className="flex flex-wrap items-center gap-2">
          <Button type="submit" disabled={previewPending}>
            {previewPending ? 'Judging the latest run…' : 'Preview and save…'}
          </Button>
          <Button type="button" variant="ghost" onClick={() => change(initialValues)}>
            Discard changes
          </Button>
          <span className="text-xs text-slate-500 dark:text-slate-400">
            {latestRun
              ? `The preview re-judges the latest analysed run (build ${latestRun.buildKey}); nothing is stored until you save.`
              : 'This case has no analysed run to preview on yet.'}
          </span>
        </div>
      )}
    </form>
  );
}

function PreviewSummary({ preview }: { preview: PolicyPreviewView | null }) {
  if (!preview) {
    return (
      <p className="text-sm">
        This case has no analysed run yet, so there is nothing to preview. The policy applies to its next run.
      </p>
    );
  }
  const shown = preview.findings.slice(0, 8);
  return (
    <div className="space-y-2 text-sm">
      <p data-testid="policy-preview-verdict">
        The latest run (build <span className="font-mono">{preview.run.buildKey}</span> on {preview.run.branch}) is now{' '}
        <VerdictBadge verdict={preview.run.verdict} />; with this policy it would be{' '}
        <VerdictBadge verdict={preview.verdict} />.
        {preview.baselineRunId ? ' Compared with the accepted baseline.' : ''}
      </p>
      {shown.length > 0 ? (
        <ul className="list-disc space-y-1 pl-5">
          {shown.map((f, i) => (
            <li key={i}>
              <span className="font-semibold">{f.severity}</span>: {f.message}
            </li>
          ))}
        </ul>
      ) : (
        <p>No findings.</p>
      )}
      {preview.findings.length > shown.length ? (
        <p className="text-xs">and {preview.findings.length - shown.length} more.</p>
      ) : null}
    </div>
  );
}
