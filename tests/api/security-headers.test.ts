/**
 * The security headers of next.config.ts reach the browser on every kind of answer: a public
 * page, a signed-in page, a JSON API answer and an API error. Framing is refused twice (CSP
 * frame-ancestors for current browsers, X-Frame-Options for old ones).
 */
import { randomUUID } from 'node:crypto';
import { beforeAll, describe, expect, it } from 'vitest';
import { createTestProject } from '../support/api';
import { appUrl } from '../support/env';
import { createTestUser, signInCookie } from '../support/users';
import { testAddress, workspaceSlug } from '../support/workspaces';

function cspDirectives(header: string | null): Map<string, string> {
  const out = new Map<string, string>();
  for (const part of (header ?? '').split(';')) {
    const [name, ...values] = part.trim().split(/\s+/);
    if (name) out.set(name, values.join(' '));
  }
  return out;
}

function expectSecurityHeaders(res: Response, label: string): void {
  const csp = cspDirectives(res.headers.get('content-security-policy'));
  expect([label, csp.get('frame-ancestors')]).toEqual([label, "'none'"]);
  expect([label, csp.get('default-src')]).toEqual([label, "'self'"]);
  expect([label, csp.get('object-src')]).toEqual([label, "'none'"]);
  expect([label, csp.get('base-uri')]).toEqual([label, "'self'"]);
  expect([label, csp.get('form-action')]).toEqual([label, "'self'"]);
  // Scripts from this origin only: no wildcard, no other host.
  expect([
    label,
    csp
      .get('script-src')
      ?.split(' ')
      .filter((s) => !s.startsWith("'")),
  ]).toEqual([label, []]);
  expect([label, res.headers.get('x-frame-options')]).toEqual([label, 'DENY']);
  expect([label, res.headers.get('referrer-policy')]).toEqual([label, 'strict-origin-when-cross-origin']);
  expect([label, res.headers.get('x-content-type-options')]).toEqual([label, 'nosniff']);
  expect([label, res.headers.get('x-powered-by')]).toEqual([label, null]);
}

describe('security headers', () => {
  let cookie: string;
  let slug: string;
  beforeAll(async () => {
    const project = await createTestProject();
    const user = await createTestUser({ workspaceId: project.workspaceId, role: 'viewer' });
    cookie = await signInCookie(user, testAddress());
    slug = await workspaceSlug(project.workspaceId);
  });

  it('are set on the public sign-in page', async () => {
    const res = await fetch(`${appUrl()}/sign-in`);
    expect(res.status).toBe(200);
    expectSecurityHeaders(res, 'sign-in page');
  });

  it('are set on a signed-in workspace page', async () => {
    const res = await fetch(`${appUrl()}/w/${slug}/settings/members`, { headers: { cookie } });
    expect(res.status).toBe(200);
    expectSecurityHeaders(res, 'members page');
  });

  it('are set on a JSON API answer and on an API error', async () => {
    const ok = await fetch(`${appUrl()}/api/health`);
    expectSecurityHeaders(ok, 'health');
    const refused = await fetch(`${appUrl()}/api/v1/runs/${randomUUID()}`);
    expect(refused.status).toBe(401);
    expectSecurityHeaders(refused, 'API 401');
  });

  it('mark every cookie next-auth sets HttpOnly and SameSite=Lax', async () => {
    const csrf = await fetch(`${appUrl()}/api/auth/csrf`);
    const cookies = csrf.headers.getSetCookie();
    expect(cookies.length).toBeGreaterThan(0);
    for (const c of cookies) {
      expect(c).toMatch(/;\s*HttpOnly/i);
      expect(c).toMatch(/;\s*SameSite=Lax/i);
      expect(c).toMatch(/;\s*Path=\//i);
    }
  });
});
