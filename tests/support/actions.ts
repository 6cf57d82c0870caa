import fs from 'node:fs';
import { createRequire } from 'node:module';
import path from 'node:path';
import { appUrl } from './env';

/**
 * Calls server actions over HTTP exactly as Next's client does, so tests reach the real action
 * with the real session handling (actions read the session cookie through next/headers, which
 * only exists inside a request):
 *   - the action's id comes from the build's server-reference manifest
 *     (<dist>/server/server-reference-manifest.json maps id -> file and exported name);
 *   - POST to a page that uses the action, header `Next-Action: <id>`, `Origin` of the app
 *     (Next refuses actions from another origin);
 *   - the arguments in React's reply encoding, made by the very encoder Next's browser client
 *     uses (`encodeReply` of the React build that ships inside Next), so a change of format in
 *     a Next upgrade changes both sides together.
 * The answer is React's flight stream; the action's return value is the row that the root
 * row's `"a":"$@<row>"` points at.
 */

interface ManifestEntry {
  filename?: string;
  exportedName?: string;
  workers: Record<string, unknown>;
}

export interface BuiltAction {
  id: string;
  file: string;
  name: string;
  pages: string[];
}

export function distDir(): string {
  return path.join(process.cwd(), process.env.NEXT_DIST_DIR ?? '.next-test');
}

/** Every server action in the build, keyed `file#exportedName`. */
export function builtActions(): Map<string, BuiltAction> {
  const file = path.join(distDir(), 'server', 'server-reference-manifest.json');
  const manifest = JSON.parse(fs.readFileSync(file, 'utf8')) as { node: Record<string, ManifestEntry> };
  const out = new Map<string, BuiltAction>();
  for (const [id, entry] of Object.entries(manifest.node)) {
    if (!entry.filename || !entry.exportedName) continue;
    out.set(`${entry.filename}#${entry.exportedName}`, {
      id,
      file: entry.filename,
      name: entry.exportedName,
      pages: Object.keys(entry.workers),
    });
  }
  return out;
}

type EncodeReply = (value: unknown) => Promise<string | FormData>;
const { encodeReply } = createRequire(import.meta.url)('next/dist/compiled/react-server-dom-webpack/client.node') as {
  encodeReply: EncodeReply;
};

export function actionId(key: string): string {
  const found = builtActions().get(key);
  if (!found)
    throw new Error(
      `server action ${key} is not in the build's manifest (not used by any page, or the build is stale)`,
    );
  return found.id;
}

export interface ActionAnswer {
  status: number;
  /** Where the action redirected to (Next's x-action-redirect header), if it did. */
  redirect: string | null;
  /** The action's return value, when it returned one. */
  result: unknown;
  setCookies: string[];
  raw: string;
}

/** The value a flight stream resolves its root's action result to. */
export function actionResultOf(raw: string): unknown {
  const rows = new Map<string, string>();
  for (const line of raw.split('\n')) {
    const m = /^([0-9a-f]+):(.*)$/.exec(line);
    if (m) rows.set(m[1]!, m[2]!);
  }
  const root = rows.get('0');
  if (!root) return undefined;
  const parsed = JSON.parse(root) as { a?: unknown };
  const ref = typeof parsed.a === 'string' ? /^\$@([0-9a-f]+)$/.exec(parsed.a) : null;
  if (!ref) return parsed.a;
  const row = rows.get(ref[1]!);
  return row === undefined ? undefined : JSON.parse(row);
}

/** The arguments a `useActionState` form passes: the previous state, then the form's fields. */
export function formArgs(fields: Record<string, string>, previous: unknown = {}): unknown[] {
  const form = new FormData();
  for (const [k, v] of Object.entries(fields)) form.append(k, v);
  return [previous, form];
}

export async function callAction(input: {
  key: string;
  page: string;
  args: unknown[];
  cookie?: string;
  headers?: Record<string, string>;
  origin?: string;
}): Promise<ActionAnswer> {
  const body = await encodeReply(input.args);
  const headers: Record<string, string> = {
    'Next-Action': actionId(input.key),
    Accept: 'text/x-component',
    Origin: input.origin ?? appUrl(),
    ...input.headers,
  };
  if (input.cookie) headers.Cookie = input.cookie;
  const res = await fetch(`${appUrl()}${input.page}`, { method: 'POST', headers, body, redirect: 'manual' });
  const raw = await res.text();
  let result: unknown;
  try {
    result = res.headers.get('content-type')?.includes('text/x-component') ? actionResultOf(raw) : undefined;
  } catch {
    result = undefined;
  }
  return {
    status: res.status,
    redirect: res.headers.get('x-action-redirect'),
    result,
    setCookies: res.headers.getSetCookie(),
    raw,
  };
}
