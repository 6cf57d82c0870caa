/**
 * How the run page's client components reach the API: URL builders, query keys and one fetch
 * helper that turns the API's error body into an Error with its message. Requests carry the
 * session cookie (same origin); the routes check membership themselves.
 */

export class ApiError extends Error {
  override readonly name = 'ApiError';
  constructor(
    message: string,
    readonly status: number,
  ) {
    super(message);
  }
}

export async function getJson<T>(url: string, signal?: AbortSignal): Promise<T> {
  const res = await fetch(url, { signal, credentials: 'same-origin', headers: { accept: 'application/json' } });
  const body: unknown = await res.json().catch(() => null);
  if (!res.ok) {
    const message = (body as { error?: { message?: string } } | null)?.error?.message;
    throw new ApiError(message ?? `The request failed (HTTP ${res.status}).`, res.status);
  }
  return body as T;
}

/** Retry server trouble once; a 4xx (no such step in the baseline, say) will not change. */
export function retryServerErrors(failures: number, error: Error): boolean {
  return failures < 1 && !(error instanceof ApiError && error.status < 500);
}

function query(params: Record<string, string | number | undefined>): string {
  const q = new URLSearchParams();
  for (const [k, v] of Object.entries(params)) if (v !== undefined) q.set(k, String(v));
  const s = q.toString();
  return s ? `?${s}` : '';
}

/** Points asked of the chart routes: enough for a wide screen, few enough for a phone. */
export const SERIES_POINTS = 1500;
export const PROFILE_POINTS = 2000;
export const PLANE_POINTS = 2500;

export interface StepOptions {
  slice?: number;
  from?: number;
  to?: number;
  points: number;
}

export const runApi = {
  status: (runId: string) => `/api/v1/runs/${runId}`,
  chart: (runId: string, variable: string) =>
    `/api/v1/runs/${runId}/chart${query({ variable, points: SERIES_POINTS })}`,
  step: (runId: string, variable: string, step: number, o: StepOptions) =>
    `/api/v1/runs/${runId}/steps/${step}${query({ variable, points: o.points, slice: o.slice, from: o.from, to: o.to })}`,
  growth: (runId: string, variable: string, step: number, slice: number | undefined) =>
    `/api/v1/runs/${runId}/growth${query({ variable, step, slice, points: PLANE_POINTS })}`,
  file: (runId: string) => `/api/v1/runs/${runId}/file`,
  metrics: (runId: string, format: 'csv' | 'json', variable?: string) =>
    `/api/v1/runs/${runId}/metrics${query({ variable, format })}`,
};

export const runKeys = {
  status: (runId: string) => ['run', runId, 'status'] as const,
  chart: (runId: string, variable: string) => ['run', runId, 'chart', variable] as const,
  step: (runId: string, variable: string, step: number, o: StepOptions) =>
    ['run', runId, 'step', variable, step, o.slice ?? null, o.from ?? null, o.to ?? null, o.points] as const,
  growth: (runId: string, variable: string, step: number, slice: number | undefined) =>
    ['run', runId, 'growth', variable, step, slice ?? null] as const,
};
