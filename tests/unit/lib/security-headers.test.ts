import { describe, expect, it } from 'vitest';
import { securityHeaders } from '@/src/lib/security-headers';

describe('securityHeaders', () => {
  it('lets the page connect to the object store it is configured with, and nowhere else', () => {
    const csp = securityHeaders({ NODE_ENV: 'production', S3_ENDPOINT: 'http://127.0.0.1:4569/' })[
      'Content-Security-Policy'
    ];
    expect(csp).toContain("connect-src 'self' http://127.0.0.1:4569;");
    expect(csp).toContain("frame-ancestors 'none'");
    expect(csp).not.toContain('unsafe-eval');
  });

  it('prefers the public endpoint browsers use over the internal one', () => {
    const csp = securityHeaders({
      S3_ENDPOINT: 'http://minio.internal:9000',
      S3_PUBLIC_ENDPOINT: 'https://files.example.org',
    })['Content-Security-Policy'];
    expect(csp).toContain("connect-src 'self' https://files.example.org;");
    expect(csp).not.toContain('minio.internal');
  });

  it('ignores a malformed endpoint instead of writing it into the policy', () => {
    const csp = securityHeaders({ S3_ENDPOINT: 'not a url' })['Content-Security-Policy'];
    expect(csp).toContain("connect-src 'self';");
  });
});
