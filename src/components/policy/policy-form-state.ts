/** What the policy actions answer; shared by the actions (server) and the form (client). */

export interface PreviewFindingView {
  severity: 'warn' | 'fail';
  variable: string;
  kind: string;
  message: string;
}

export interface PolicyPreviewView {
  run: { id: string; buildKey: string; branch: string; verdict: string | null };
  verdict: 'pass' | 'warn' | 'fail';
  findings: PreviewFindingView[];
  baselineRunId: string | null;
}

export interface PolicyActionState {
  message?: string;
  fieldErrors?: Record<string, string[]>;
}

export interface PolicyPreviewState extends PolicyActionState {
  /** True once a preview was computed (preview null: the case has no analysed run). */
  previewed?: boolean;
  preview?: PolicyPreviewView | null;
}

export interface PolicySaveState extends PolicyActionState {
  ok?: boolean;
  rejudged?: { runId: string; before: string | null; after: string } | null;
}
