import { ingestManifestSchema, type IngestManifest } from '@/src/ingest/manifest';
import type { VariableOptions } from '@/src/analysis/types';

/**
 * The manual upload form's pure parts: its manifest options turned into the manifest the API
 * takes (validated with the readers' own schema), the default build key, and which files are
 * accepted. The browser-only steps (presign, PUT, post, poll) are in upload-client.ts.
 */

export interface ManifestFormValues {
  /** Variable names, separated by commas or spaces; empty reads every variable of the file. */
  variables: string;
  /** Axis names that wrap round, separated by commas or spaces (e.g. "x"). */
  periodicAxes: string;
  lowerBound: string;
  upperBound: string;
  /** '' (not given), '1' or '-1': the sign of the velocity along the fastest axis. */
  velocitySign: '' | '1' | '-1';
  system: boolean;
  conservative: boolean;
}

export const EMPTY_MANIFEST_FORM: ManifestFormValues = {
  variables: '',
  periodicAxes: '',
  lowerBound: '',
  upperBound: '',
  velocitySign: '',
  system: false,
  conservative: true,
};

export type ManifestFieldErrors = Partial<Record<keyof ManifestFormValues, string>>;

function names(text: string): string[] {
  return text
    .split(/[\s,]+/)
    .map((n) => n.trim())
    .filter((n) => n !== '');
}

function parseBound(text: string): number | undefined | 'invalid' {
  const t = text.trim();
  if (t === '') return undefined;
  if (!/^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(t)) return 'invalid';
  return Number(t);
}

/** The per-variable options the form sets; empty when it sets none (defaults need no manifest). */
function optionsOf(values: ManifestFormValues, errors: ManifestFieldErrors): VariableOptions {
  const options: VariableOptions = {};
  const axes = names(values.periodicAxes);
  if (axes.length > 0) options.periodic = Object.fromEntries(axes.map((a) => [a, true]));
  const lower = parseBound(values.lowerBound);
  const upper = parseBound(values.upperBound);
  if (lower === 'invalid') errors.lowerBound = 'Enter a number, e.g. 0.';
  if (upper === 'invalid') errors.upperBound = 'Enter a number, e.g. 1.';
  if (typeof lower === 'number' && typeof upper === 'number' && lower > upper)
    errors.upperBound = 'The upper bound must not be below the lower bound.';
  const bounds = { ...(typeof lower === 'number' ? { lower } : {}), ...(typeof upper === 'number' ? { upper } : {}) };
  if (Object.keys(bounds).length > 0) options.bounds = bounds;
  if (values.velocitySign !== '') options.velocitySign = values.velocitySign === '1' ? 1 : -1;
  if (values.system) options.system = true;
  if (!values.conservative) options.conservative = false;
  return options;
}

/**
 * The manifest for the API, or the errors per field. Options apply to each named variable, so
 * setting one without naming a variable is an error rather than silently ignored.
 */
export function buildManifest(values: ManifestFormValues): { manifest?: IngestManifest; errors: ManifestFieldErrors } {
  const errors: ManifestFieldErrors = {};
  const variables = names(values.variables);
  const options = optionsOf(values, errors);
  const hasOptions = Object.keys(options).length > 0;
  if (hasOptions && variables.length === 0) errors.variables = 'Name the variable(s) these options apply to.';
  if (Object.keys(errors).length > 0) return { errors };
  if (variables.length === 0) return { errors };
  const candidate: IngestManifest = {
    variables,
    ...(hasOptions ? { variableOptions: Object.fromEntries(variables.map((v) => [v, options])) } : {}),
  };
  const checked = ingestManifestSchema.safeParse(candidate);
  if (!checked.success)
    return { errors: { variables: checked.error.issues[0]?.message ?? 'These manifest options are not valid.' } };
  return { manifest: checked.data, errors };
}

/** "manual-2025-03-14": manual uploads of one day share a build, as a CI build groups its cases. */
export function defaultBuildKey(now: Date): string {
  return `manual-${now.toISOString().slice(0, 10)}`;
}

const ACCEPTED = /\.(csv|csv\.gz|txt|h5|hdf5|he5|nc|nc4)$/i;

/** Whether a file's name is one of the formats the readers take. */
export function isAcceptedFile(name: string): boolean {
  return ACCEPTED.test(name);
}

/** The Content-Type to sign and send; the readers detect the format from the bytes anyway. */
export function contentTypeFor(name: string): string {
  const lower = name.toLowerCase();
  if (lower.endsWith('.gz')) return 'application/gzip';
  if (lower.endsWith('.csv') || lower.endsWith('.txt')) return 'text/csv';
  if (/\.(h5|hdf5|he5)$/.test(lower)) return 'application/x-hdf5';
  if (/\.(nc|nc4)$/.test(lower)) return 'application/x-netcdf';
  return 'application/octet-stream';
}

/** "1.2 MB" style sizes for the progress line. */
export function formatBytes(bytes: number): string {
  if (bytes < 1024) return `${bytes} B`;
  const units = ['KiB', 'MiB', 'GiB'];
  let value = bytes / 1024;
  let unit = 0;
  while (value >= 1024 && unit < units.length - 1) {
    value /= 1024;
    unit++;
  }
  return `${value >= 10 ? value.toFixed(0) : value.toFixed(1)} ${units[unit]}`;
}
