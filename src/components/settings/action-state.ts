/**
 * What every settings form action answers, read with `useActionState`. `code` is `ok` or the
 * `<kind>:<subject>` of a refusal (`forbidden:role`, `conflict:last_admin`, ...), so the form and
 * the tests can tell outcomes apart without parsing messages.
 */
export interface SettingsFormState {
  ok?: boolean;
  code?: string;
  message?: string;
  fieldErrors?: Record<string, string[] | undefined>;
  /** What the person typed, given back after a refusal so they need not type it again. */
  values?: Record<string, string>;
}

/** The one answer that carries a CI token's secret: the only time it exists in clear. */
export interface TokenFormState extends SettingsFormState {
  issued?: { name: string; prefix: string; projectSlug: string; token: string };
}

export type SettingsAction<S extends SettingsFormState = SettingsFormState> = (
  previous: S,
  form: FormData,
) => Promise<S>;

export const firstError = (state: SettingsFormState, field: string): string | undefined =>
  state.fieldErrors?.[field]?.[0];
