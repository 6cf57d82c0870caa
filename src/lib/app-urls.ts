/**
 * Addresses of the web app's pages, for mails and anything else that links into the app from
 * outside it. Every dynamic segment is URL-encoded (CI build keys may hold any character).
 */
export function appUrls(appUrl: string, workspaceSlug: string) {
  const base = appUrl.replace(/\/+$/, '');
  const ws = `${base}/w/${encodeURIComponent(workspaceSlug)}`;
  return {
    overview: ws,
    project: (projectSlug: string) => `${ws}/projects/${encodeURIComponent(projectSlug)}`,
    build: (projectSlug: string, buildKey: string) =>
      `${ws}/projects/${encodeURIComponent(projectSlug)}/builds/${encodeURIComponent(buildKey)}`,
    run: (runId: string) => `${ws}/runs/${encodeURIComponent(runId)}`,
    notificationSettings: `${ws}/settings/notifications`,
  };
}

export type AppUrls = ReturnType<typeof appUrls>;

/** The unsubscribe page (confirm button) and its one-click POST target (RFC 8058). */
export function unsubscribeUrls(appUrl: string, token: string): { page: string; oneClick: string } {
  const base = appUrl.replace(/\/+$/, '');
  const q = `token=${encodeURIComponent(token)}`;
  return { page: `${base}/unsubscribe?${q}`, oneClick: `${base}/unsubscribe/one-click?${q}` };
}
