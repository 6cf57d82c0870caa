/**
 * Pieces shared by the notification mails: HTML escaping, the page frame, the footer with the
 * note on what a pass means and the unsubscribe link, number and date formats. Templates are
 * plain functions (data in, `{ subject, text, html }` out) so they can be tested without a
 * server; every value that comes from data goes through `escapeHtml` in the HTML part.
 */

export interface RenderedMail {
  subject: string;
  text: string;
  html: string;
}

export function escapeHtml(value: string | number): string {
  return String(value).replace(
    /[&<>"']/g,
    (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!,
  );
}

/** Subject lines are a single line: no control characters, bounded length. */
export function subjectLine(value: string): string {
  const clean = value
    .replace(/[\u0000-\u001f\u007f]+/g, ' ')
    .replace(/\s+/g, ' ')
    .trim();
  return clean.length > 180 ? `${clean.slice(0, 177)}...` : clean;
}

/** What every notification mail says about the meaning of a pass. */
export const PASS_NOTE =
  'A pass means the snapshots showed no spurious oscillation, bound violation or drift under the case policy. It does not validate the physics, the accuracy or the convergence of the solver.';

export function formatPercent(rate: number | null): string {
  if (rate === null) return 'n/a';
  const pct = rate * 100;
  return `${pct === 100 || pct === 0 ? pct.toFixed(0) : pct.toFixed(1)} %`;
}

/** A change in percentage points with its sign: `+2.5 points`, `-10 points`, `no change`. */
export function formatPointsChange(points: number | null): string {
  if (points === null) return 'no comparison';
  if (points === 0) return 'no change';
  const abs = Math.abs(points);
  const text = Number.isInteger(abs) ? abs.toFixed(0) : abs.toFixed(1);
  return `${points > 0 ? '+' : '-'}${text} ${abs === 1 ? 'point' : 'points'}`;
}

export function formatDay(instant: Date, timeZone: string): string {
  return new Intl.DateTimeFormat('en-GB', { timeZone, weekday: 'short', day: 'numeric', month: 'short' }).format(
    instant,
  );
}

export function formatDayTime(instant: Date, timeZone: string): string {
  const year = new Intl.DateTimeFormat('en-GB', { timeZone, year: 'numeric' }).format(instant);
  const time = new Intl.DateTimeFormat('en-GB', {
    timeZone,
    hour: '2-digit',
    minute: '2-digit',
    hourCycle: 'h23',
  }).format(instant);
  return `${formatDay(instant, timeZone)} ${year}, ${time}`;
}

export function plural(n: number, one: string, many = `${one}s`): string {
  return `${n} ${n === 1 ? one : many}`;
}

export function link(url: string, label: string): string {
  return `<a href="${escapeHtml(url)}" style="color:#1d4ed8">${escapeHtml(label)}</a>`;
}

const verdictStyle: Record<string, string> = {
  pass: 'background:#dcfce7;color:#166534',
  warn: 'background:#fef9c3;color:#854d0e',
  fail: 'background:#fee2e2;color:#991b1b',
  error: 'background:#e2e8f0;color:#334155',
};

/** A verdict as a labelled badge: readable as text, the colour only helps. */
export function verdictBadge(verdict: string | null): string {
  const v = verdict ?? 'open';
  const style = verdictStyle[v] ?? 'background:#f1f5f9;color:#475569';
  return `<span style="${style};padding:1px 6px;border-radius:4px;font-size:12px;font-weight:600">${escapeHtml(v.toUpperCase())}</span>`;
}

export interface FooterInput {
  reason: string;
  settingsUrl: string;
  unsubscribeUrl: string;
  unsubscribeLabel: string;
}

export function footerText(f: FooterInput): string[] {
  return [
    '-- ',
    PASS_NOTE,
    '',
    f.reason,
    `Notification settings: ${f.settingsUrl}`,
    `${f.unsubscribeLabel}: ${f.unsubscribeUrl}`,
  ];
}

/** The HTML frame: one column, inline styles, no images, readable in any client. */
export function frameHtml(input: { title: string; preheader: string; body: string; footer: FooterInput }): string {
  const f = input.footer;
  return `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width"><title>${escapeHtml(input.title)}</title></head>
<body style="margin:0;padding:0;background:#f8fafc">
<div style="display:none;max-height:0;overflow:hidden">${escapeHtml(input.preheader)}</div>
<div style="max-width:640px;margin:0 auto;padding:24px 20px;font-family:system-ui,-apple-system,'Segoe UI',sans-serif;font-size:14px;line-height:1.5;color:#0f172a;background:#ffffff">
${input.body}
<hr style="border:none;border-top:1px solid #e2e8f0;margin:24px 0 12px">
<p style="font-size:12px;color:#475569;margin:0 0 8px">${escapeHtml(PASS_NOTE)}</p>
<p style="font-size:12px;color:#64748b;margin:0">${escapeHtml(f.reason)}<br>
${link(f.settingsUrl, 'Notification settings')} &middot; ${link(f.unsubscribeUrl, f.unsubscribeLabel)}</p>
</div>
</body></html>`;
}
