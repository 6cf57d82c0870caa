'use client';

import { useRouter } from 'next/navigation';
import { useEffect, useId, useRef, useState, type DragEvent, type FormEvent, type ReactNode } from 'react';
import { z } from 'zod';
import { Button } from '@/src/components/ui/button';
import { Notice } from '@/src/components/ui/notice';
import { VerdictBadge } from '@/src/components/ui/verdict-badge';
import { runTargetSchema } from '@/src/schemas/runs';
import {
  newIdempotencyKey,
  postRun,
  putFileWithProgress,
  requestPresignedUpload,
  waitForRunVerdict,
  type RunStatus,
} from './upload-client';
import {
  EMPTY_MANIFEST_FORM,
  buildManifest,
  contentTypeFor,
  formatBytes,
  isAcceptedFile,
  type ManifestFieldErrors,
  type ManifestFormValues,
} from './upload-manifest';

export type UploadFormProps = {
  workspace: string;
  projects: { slug: string; name: string; defaultBranch: string; cases: string[] }[];
  /** Computed by the server so the first render matches on both sides. */
  defaultBuild: string;
};

type Phase = 'idle' | 'presign' | 'upload' | 'post' | 'analyse' | 'done' | 'failed';

const targetSchema = runTargetSchema.pick({ build: true, commit: true, branch: true, case: true });

const inputClass =
  'mt-1 block w-full rounded-md border border-slate-300 bg-white px-2.5 py-1.5 text-sm text-slate-900 shadow-sm focus:border-sky-600 focus:outline-none focus:ring-1 focus:ring-sky-600 disabled:opacity-60 aria-[invalid=true]:border-verdict-fail dark:border-slate-700 dark:bg-slate-900 dark:text-slate-100';

function Labelled({
  id,
  label,
  hint,
  error,
  children,
}: {
  id: string;
  label: string;
  hint?: string;
  error?: string;
  children: ReactNode;
}) {
  return (
    <div>
      <label htmlFor={id} className="block text-sm font-medium text-slate-700 dark:text-slate-200">
        {label}
      </label>
      {children}
      {hint && !error ? (
        <p id={`${id}-hint`} className="mt-1 text-xs text-slate-500 dark:text-slate-400">
          {hint}
        </p>
      ) : null}
      {error ? (
        <p id={`${id}-error`} className="mt-1 text-xs text-verdict-fail dark:text-red-400">
          {error}
        </p>
      ) : null}
    </div>
  );
}

/** aria attributes tying an input to its hint or error. */
function describe(id: string, hint: boolean, error?: string) {
  return {
    'aria-invalid': error ? true : undefined,
    'aria-describedby': error ? `${id}-error` : hint ? `${id}-hint` : undefined,
  } as const;
}

const STEPS: { phase: Phase; label: string }[] = [
  { phase: 'presign', label: 'Prepare the upload' },
  { phase: 'upload', label: 'Send the file to storage' },
  { phase: 'post', label: 'Record the run' },
  { phase: 'analyse', label: 'Analyse' },
];

function stepState(step: Phase, phase: Phase, failedAt: Phase | null): 'done' | 'current' | 'failed' | 'todo' {
  const order = STEPS.map((s) => s.phase);
  if (phase === 'failed') {
    const at = order.indexOf(failedAt ?? 'presign');
    const i = order.indexOf(step);
    return i < at ? 'done' : i === at ? 'failed' : 'todo';
  }
  if (phase === 'done') return 'done';
  const i = order.indexOf(step);
  const now = order.indexOf(phase);
  return i < now ? 'done' : i === now ? 'current' : 'todo';
}

const stepMark = { done: '✓', current: '…', failed: '✗', todo: '·' } as const;

/**
 * Manual upload: drop or choose a snapshot file, say where it belongs and how to read it, and
 * follow it through storage (a real progress bar of the bytes sent) and analysis to its run page.
 */
export function UploadForm({ workspace, projects, defaultBuild }: UploadFormProps) {
  const router = useRouter();
  const id = useId().replace(/:/g, '');
  const first = projects[0];
  const [file, setFile] = useState<File | null>(null);
  const [fileError, setFileError] = useState<string | null>(null);
  const [dragging, setDragging] = useState(false);
  const [project, setProject] = useState(first?.slug ?? '');
  const [caseName, setCaseName] = useState('');
  const [build, setBuild] = useState(defaultBuild);
  const [branch, setBranch] = useState(first?.defaultBranch ?? 'main');
  const [branchEdited, setBranchEdited] = useState(false);
  const [commit, setCommit] = useState('manual');
  const [manifest, setManifest] = useState<ManifestFormValues>(EMPTY_MANIFEST_FORM);
  const [errors, setErrors] = useState<Record<string, string | undefined>>({});
  const [manifestErrors, setManifestErrors] = useState<ManifestFieldErrors>({});
  const [phase, setPhase] = useState<Phase>('idle');
  const [failedAt, setFailedAt] = useState<Phase | null>(null);
  const [progress, setProgress] = useState({ sent: 0, total: 0 });
  const [run, setRun] = useState<{ id: string; status: RunStatus | null } | null>(null);
  const [message, setMessage] = useState<string | null>(null);
  const abortRef = useRef<AbortController | null>(null);
  const formRef = useRef<HTMLFormElement>(null);
  const busy = phase !== 'idle' && phase !== 'failed' && phase !== 'done';
  const selected = projects.find((p) => p.slug === project);

  useEffect(() => () => abortRef.current?.abort(), []);

  const pickFile = (f: File | undefined | null) => {
    if (!f) return;
    if (!isAcceptedFile(f.name)) {
      setFileError(`"${f.name}" is not a CSV (.csv, .csv.gz) or HDF5 (.h5, .hdf5, .nc) file.`);
      return;
    }
    if (f.size === 0) {
      setFileError(`"${f.name}" is empty.`);
      return;
    }
    setFileError(null);
    setFile(f);
  };

  const onDrop = (e: DragEvent) => {
    e.preventDefault();
    setDragging(false);
    if (!busy) pickFile(e.dataTransfer.files[0]);
  };

  const chooseProject = (slug: string) => {
    setProject(slug);
    // Follow the project's default branch until the person types their own.
    if (!branchEdited) setBranch(projects.find((p) => p.slug === slug)?.defaultBranch ?? 'main');
  };

  const check = (): { manifest?: ReturnType<typeof buildManifest>['manifest'] } | null => {
    const target = targetSchema.safeParse({ build, commit, branch, case: caseName });
    const found: Record<string, string | undefined> = target.success
      ? {}
      : Object.fromEntries(Object.entries(z.flattenError(target.error).fieldErrors).map(([k, v]) => [k, v?.[0]]));
    if (!selected) found.project = 'Choose a project.';
    const built = buildManifest(manifest);
    setErrors(found);
    setManifestErrors(built.errors);
    if (!file) setFileError('Choose or drop a snapshot file first.');
    const ok = file && Object.keys(found).length === 0 && Object.keys(built.errors).length === 0;
    if (!ok) {
      // Move focus to the first problem, after React has marked it.
      requestAnimationFrame(() => formRef.current?.querySelector<HTMLElement>('[aria-invalid="true"]')?.focus());
      return null;
    }
    return { manifest: built.manifest };
  };

  const fail = (at: Phase, err: unknown) => {
    setFailedAt(at);
    setPhase('failed');
    setMessage(err instanceof Error ? err.message : String(err));
  };

  const start = async (e: FormEvent) => {
    e.preventDefault();
    if (busy) return;
    const ok = check();
    if (!ok || !file || !selected) return;
    const abort = new AbortController();
    abortRef.current = abort;
    setMessage(null);
    setRun(null);
    setProgress({ sent: 0, total: file.size });
    let at: Phase = 'presign';
    try {
      setPhase('presign');
      const contentType = contentTypeFor(file.name);
      const upload = await requestPresignedUpload({
        workspace,
        project: selected.slug,
        fileName: file.name,
        size: file.size,
        contentType,
      });
      setPhase((at = 'upload'));
      await putFileWithProgress(upload, file, (sent, total) => setProgress({ sent, total }), abort.signal);
      setPhase((at = 'post'));
      const created = await postRun(
        {
          workspace,
          project: selected.slug,
          build: build.trim(),
          commit: commit.trim(),
          branch: branch.trim(),
          case: caseName.trim(),
          manifest: ok.manifest,
          objectKey: upload.objectKey,
          fileName: file.name,
        },
        newIdempotencyKey(),
      );
      setRun({ id: created.id, status: null });
      setPhase((at = 'analyse'));
      const final = await waitForRunVerdict(created.id, (status) => setRun({ id: created.id, status }), abort.signal);
      setRun({ id: created.id, status: final });
      setPhase('done');
      router.push(`/w/${workspace}/runs/${created.id}`);
    } catch (err) {
      if (!abort.signal.aborted || at !== 'analyse') fail(at, err);
    }
  };

  const cancel = () => {
    abortRef.current?.abort();
    setPhase('failed');
    setFailedAt(phase);
    setMessage(
      phase === 'analyse'
        ? 'Stopped waiting; the run is still analysed and will appear on its case page.'
        : 'Upload cancelled.',
    );
  };

  if (projects.length === 0) {
    return (
      <Notice>
        This workspace has no project yet. A project is created with the first CI upload of its token, or by an admin.
      </Notice>
    );
  }

  const percent = progress.total > 0 ? Math.round((progress.sent / progress.total) * 100) : 0;
  const fileInputId = `${id}-file`;
  const m = manifest;
  const setM = (patch: Partial<ManifestFormValues>) => setManifest({ ...m, ...patch });

  return (
    <form ref={formRef} onSubmit={start} aria-label="Upload a snapshot file" noValidate className="space-y-6">
      <div
        onDragOver={(e) => {
          e.preventDefault();
          if (!busy) setDragging(true);
        }}
        onDragLeave={() => setDragging(false)}
        onDrop={onDrop}
        data-testid="drop-zone"
        className={`rounded-lg border-2 border-dashed p-6 text-center transition-colors ${dragging ? 'border-sky-500 bg-sky-50 dark:bg-sky-950' : 'border-slate-300 dark:border-slate-700'}`}
      >
        <p className="text-sm text-slate-600 dark:text-slate-300">
          Drop a snapshot file here (CSV, .csv.gz, HDF5 or NetCDF-4), or
        </p>
        <input
          id={fileInputId}
          type="file"
          accept=".csv,.gz,.txt,.h5,.hdf5,.he5,.nc,.nc4"
          className="peer sr-only"
          disabled={busy}
          onChange={(e) => pickFile(e.target.files?.[0])}
          aria-invalid={fileError ? true : undefined}
          aria-describedby={fileError ? `${fileInputId}-error` : `${fileInputId}-chosen`}
        />
        <label
          htmlFor={fileInputId}
          className="mt-2 inline-block cursor-pointer rounded-md border border-slate-300 bg-white px-3 py-1.5 text-sm font-medium hover:bg-slate-50 peer-focus-visible:outline-2 peer-focus-visible:outline-offset-2 peer-focus-visible:outline-sky-600 dark:border-slate-700 dark:bg-slate-900 dark:hover:bg-slate-800"
        >
          Choose a snapshot file
        </label>
        <p id={`${fileInputId}-chosen`} className="mt-2 text-sm" data-testid="chosen-file">
          {file ? (
            <>
              <span className="font-mono">{file.name}</span> · {formatBytes(file.size)}
            </>
          ) : (
            <span className="text-slate-500 dark:text-slate-400">No file chosen.</span>
          )}
        </p>
        {fileError ? (
          <p id={`${fileInputId}-error`} className="mt-1 text-sm text-verdict-fail dark:text-red-400">
            {fileError}
          </p>
        ) : null}
      </div>

      <fieldset disabled={busy} className="grid min-w-0 gap-4 sm:grid-cols-2 lg:grid-cols-3">
        <legend className="mb-2 text-sm font-semibold">Where the run belongs</legend>
        <Labelled id={`${id}-project`} label="Project" error={errors.project}>
          <select
            id={`${id}-project`}
            className={inputClass}
            value={project}
            onChange={(e) => chooseProject(e.target.value)}
            {...describe(`${id}-project`, false, errors.project)}
          >
            {projects.map((p) => (
              <option key={p.slug} value={p.slug}>
                {p.name} ({p.slug})
              </option>
            ))}
          </select>
        </Labelled>
        <Labelled
          id={`${id}-case`}
          label="Case"
          hint="An existing case, or a new name (letters, digits, . - _)."
          error={errors.case}
        >
          <input
            id={`${id}-case`}
            className={inputClass}
            value={caseName}
            onChange={(e) => setCaseName(e.target.value)}
            list={`${id}-cases`}
            autoComplete="off"
            required
            {...describe(`${id}-case`, true, errors.case)}
          />
          <datalist id={`${id}-cases`}>
            {(selected?.cases ?? []).map((c) => (
              <option key={c} value={c} />
            ))}
          </datalist>
        </Labelled>
        <Labelled
          id={`${id}-build`}
          label="Build key"
          hint="Manual uploads of one day share a build by default."
          error={errors.build}
        >
          <input
            id={`${id}-build`}
            className={inputClass}
            value={build}
            onChange={(e) => setBuild(e.target.value)}
            required
            {...describe(`${id}-build`, true, errors.build)}
          />
        </Labelled>
        <Labelled id={`${id}-branch`} label="Branch" error={errors.branch}>
          <input
            id={`${id}-branch`}
            className={inputClass}
            value={branch}
            onChange={(e) => {
              setBranch(e.target.value);
              setBranchEdited(true);
            }}
            required
            {...describe(`${id}-branch`, false, errors.branch)}
          />
        </Labelled>
        <Labelled
          id={`${id}-commit`}
          label="Commit"
          hint='Optional; "manual" when it is not a commit.'
          error={errors.commit}
        >
          <input
            id={`${id}-commit`}
            className={inputClass}
            value={commit}
            onChange={(e) => setCommit(e.target.value)}
            {...describe(`${id}-commit`, true, errors.commit)}
          />
        </Labelled>
      </fieldset>

      <fieldset disabled={busy} className="grid min-w-0 gap-4 sm:grid-cols-2 lg:grid-cols-3">
        <legend className="mb-2 text-sm font-semibold">How to read it (manifest, all optional)</legend>
        <Labelled
          id={`${id}-variables`}
          label="Variable name(s)"
          hint="Separated by commas; empty reads every variable of the file."
          error={manifestErrors.variables}
        >
          <input
            id={`${id}-variables`}
            className={inputClass}
            value={m.variables}
            onChange={(e) => setM({ variables: e.target.value })}
            placeholder="e.g. salinity"
            autoComplete="off"
            {...describe(`${id}-variables`, true, manifestErrors.variables)}
          />
        </Labelled>
        <Labelled
          id={`${id}-periodic`}
          label="Periodic axes"
          hint="Axis names that wrap round, e.g. x."
          error={manifestErrors.periodicAxes}
        >
          <input
            id={`${id}-periodic`}
            className={inputClass}
            value={m.periodicAxes}
            onChange={(e) => setM({ periodicAxes: e.target.value })}
            autoComplete="off"
            {...describe(`${id}-periodic`, true, manifestErrors.periodicAxes)}
          />
        </Labelled>
        <Labelled
          id={`${id}-velocity`}
          label="Velocity sign"
          hint="Along the fastest axis; lets findings say upstream or downstream."
        >
          <select
            id={`${id}-velocity`}
            className={inputClass}
            value={m.velocitySign}
            onChange={(e) => setM({ velocitySign: e.target.value as ManifestFormValues['velocitySign'] })}
            {...describe(`${id}-velocity`, true)}
          >
            <option value="">not given</option>
            <option value="1">positive (+1)</option>
            <option value="-1">negative (−1)</option>
          </select>
        </Labelled>
        <Labelled
          id={`${id}-lower`}
          label="Physical lower bound"
          hint="e.g. 0 for a concentration."
          error={manifestErrors.lowerBound}
        >
          <input
            id={`${id}-lower`}
            className={inputClass}
            inputMode="decimal"
            value={m.lowerBound}
            onChange={(e) => setM({ lowerBound: e.target.value })}
            {...describe(`${id}-lower`, true, manifestErrors.lowerBound)}
          />
        </Labelled>
        <Labelled
          id={`${id}-upper`}
          label="Physical upper bound"
          hint="e.g. 1 for a mass fraction."
          error={manifestErrors.upperBound}
        >
          <input
            id={`${id}-upper`}
            className={inputClass}
            inputMode="decimal"
            value={m.upperBound}
            onChange={(e) => setM({ upperBound: e.target.value })}
            {...describe(`${id}-upper`, true, manifestErrors.upperBound)}
          />
        </Labelled>
        <div className="space-y-2 pt-6 text-sm">
          <label className="flex items-center gap-2">
            <input
              type="checkbox"
              className="h-4 w-4"
              checked={m.system}
              onChange={(e) => setM({ system: e.target.checked })}
            />
            System variable (component of a nonlinear system)
          </label>
          <label className="flex items-center gap-2">
            <input
              type="checkbox"
              className="h-4 w-4"
              checked={m.conservative}
              onChange={(e) => setM({ conservative: e.target.checked })}
            />
            Conservative (check mass drift)
          </label>
        </div>
      </fieldset>

      <div className="flex flex-wrap items-center gap-3">
        <Button type="submit" disabled={busy}>
          {busy ? 'Uploading…' : 'Upload and analyse'}
        </Button>
        {busy ? (
          <Button variant="secondary" onClick={cancel}>
            Cancel
          </Button>
        ) : null}
      </div>

      {phase !== 'idle' ? (
        <section
          aria-label="Upload progress"
          className="space-y-3 rounded-lg border border-slate-200 p-4 dark:border-slate-800"
        >
          <div>
            <div className="flex justify-between text-sm">
              <span>File</span>
              <span aria-hidden>
                {percent} % · {formatBytes(progress.sent)} of {formatBytes(progress.total)}
              </span>
            </div>
            <div
              role="progressbar"
              aria-label="Bytes sent to storage"
              aria-valuemin={0}
              aria-valuemax={100}
              aria-valuenow={percent}
              aria-valuetext={`${percent} %, ${formatBytes(progress.sent)} of ${formatBytes(progress.total)}`}
              className="mt-1 h-2 w-full overflow-hidden rounded bg-slate-200 dark:bg-slate-800"
            >
              <div
                className="h-full bg-sky-600 transition-[width] duration-200 dark:bg-sky-400"
                style={{ width: `${percent}%` }}
              />
            </div>
          </div>
          <ol className="space-y-1 text-sm">
            {STEPS.map((s) => {
              const state = stepState(s.phase, phase, failedAt);
              return (
                <li
                  key={s.phase}
                  data-state={state}
                  className={
                    state === 'todo'
                      ? 'text-slate-400 dark:text-slate-500'
                      : state === 'failed'
                        ? 'text-verdict-fail dark:text-red-400'
                        : ''
                  }
                >
                  <span aria-hidden className="inline-block w-5">
                    {stepMark[state]}
                  </span>
                  {s.label}
                  <span className="sr-only"> ({state})</span>
                </li>
              );
            })}
          </ol>
          <p role="status" aria-live="polite" className="text-sm" data-testid="upload-status">
            {phase === 'analyse' && run?.status ? `Run ${run.status.status}…` : null}
            {phase === 'done' && run?.status ? (
              <>
                Analysis finished: <VerdictBadge verdict={run.status.verdict} />. Opening the run…
              </>
            ) : null}
          </p>
          {phase === 'failed' && message ? <Notice tone="error">{message}</Notice> : null}
        </section>
      ) : null}
    </form>
  );
}
