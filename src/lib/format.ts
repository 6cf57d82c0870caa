/** Small display helpers shared by pages and mails. Pure; no locale surprises (fixed en-GB, UTC). */

export function shortCommit(commit: string): string {
  return /^[0-9a-f]{8,}$/i.test(commit) ? commit.slice(0, 8) : commit;
}

const dateTime = new Intl.DateTimeFormat('en-GB', { dateStyle: 'medium', timeStyle: 'short', timeZone: 'UTC' });
const dateOnly = new Intl.DateTimeFormat('en-GB', { dateStyle: 'medium', timeZone: 'UTC' });

export function formatDateTime(d: Date): string {
  return `${dateTime.format(d)} UTC`;
}

export function formatDate(d: Date): string {
  return dateOnly.format(d);
}

/** "3 h ago", "2 days ago": relative to `now`, for lists where recency matters more than the hour. */
export function formatAgo(d: Date, now: Date = new Date()): string {
  const s = Math.round((now.getTime() - d.getTime()) / 1000);
  if (s < 60) return 'just now';
  if (s < 3600) return `${Math.floor(s / 60)} min ago`;
  if (s < 86_400) return `${Math.floor(s / 3600)} h ago`;
  const days = Math.floor(s / 86_400);
  return days === 1 ? '1 day ago' : `${days} days ago`;
}

/** A ratio as a percentage with no false precision: "93 %", "0.5 %". */
export function formatPercent(ratio: number): string {
  const p = ratio * 100;
  return `${p >= 10 || p === 0 ? p.toFixed(0) : p.toFixed(1)} %`;
}
