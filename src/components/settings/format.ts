/**
 * Dates on the settings pages, formatted on the server in UTC so that the server's and the
 * browser's rendering agree (no hydration mismatch) and every reader sees the same time.
 */
export function formatDateTime(date: Date | null | undefined): string {
  if (!date) return '—';
  return `${date.toISOString().slice(0, 16).replace('T', ' ')} UTC`;
}

export function formatDate(date: Date | null | undefined): string {
  if (!date) return '—';
  return date.toISOString().slice(0, 10);
}
