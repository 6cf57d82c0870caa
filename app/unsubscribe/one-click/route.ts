import { AppError } from '@/src/server/errors';
import { json, route } from '@/src/server/http/handler';
import { applyUnsubscribe } from '@/src/server/services/unsubscribe';

/**
 * One-click unsubscribe (RFC 8058): the List-Unsubscribe header of every notification mail
 * points here. A mail client POSTs `List-Unsubscribe=One-Click` without cookies; the signed token
 * in the query is the only credential. The confirm button of /unsubscribe posts here too (with
 * `via=page`) and is sent back to that page, which then shows the new state.
 */

export const dynamic = 'force-dynamic';

function tokenOf(request: Request): string {
  const token = new URL(request.url).searchParams.get('token');
  if (!token) throw new AppError('invalid:token', 'The unsubscribe address has no token.');
  return token;
}

/**
 * Back to the page, as a relative Location: behind a proxy the request URL may name an internal
 * host, and a browser refuses to follow a form's redirect to another origin (CSP form-action).
 */
function backToPage(token: string): Response {
  return new Response(null, {
    status: 303,
    headers: { location: `/unsubscribe?token=${encodeURIComponent(token)}`, 'cache-control': 'no-store' },
  });
}

async function readForm(request: Request): Promise<URLSearchParams> {
  const type = request.headers.get('content-type') ?? '';
  if (type.includes('multipart/form-data')) {
    const form = await request.formData().catch(() => null);
    const params = new URLSearchParams();
    form?.forEach((value, key) => {
      if (typeof value === 'string') params.append(key, value);
    });
    return params;
  }
  return new URLSearchParams(await request.text().catch(() => ''));
}

export const POST = route(async (request) => {
  const token = tokenOf(request);
  const form = await readForm(request);
  const fromPage = form.get('via') === 'page';
  if (form.get('List-Unsubscribe') !== 'One-Click') {
    throw new AppError('invalid:unsubscribe', 'Send `List-Unsubscribe=One-Click` in the body (RFC 8058).');
  }
  const result = await applyUnsubscribe(token);
  // The page explains any outcome, including a bad or expired link.
  if (fromPage) return backToPage(token);
  if (!result.ok) {
    const messages = {
      malformed: 'This unsubscribe link is not valid.',
      signature: 'This unsubscribe link is not valid.',
      expired: 'This unsubscribe link has expired; change your notifications in the settings after signing in.',
      gone: 'This subscription no longer exists.',
    } as const;
    throw new AppError(result.reason === 'gone' ? 'not_found:subscription' : 'invalid:token', messages[result.reason]);
  }
  return json({ unsubscribed: true, scope: result.scope, project: result.projectName });
});

/** Someone opened the one-click address in a browser: show the confirm page instead. */
export const GET = route(async (request) => backToPage(tokenOf(request)));
