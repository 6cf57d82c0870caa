/**
 * Security headers for every response, computed when a request is served (not at build time),
 * so the object-store origin that browsers upload to can change with the environment without a
 * rebuild. The CSP allows inline styles (React style props, d3) and Next's inline bootstrap
 * script; connections go to this origin and the object store only.
 */
export function securityHeaders(env: Record<string, string | undefined>): Record<string, string> {
  const s3Origin = originOf(env.S3_PUBLIC_ENDPOINT || env.S3_ENDPOINT);
  const isDev = env.NODE_ENV !== 'production';
  const csp = [
    "default-src 'self'",
    `script-src 'self' 'unsafe-inline'${isDev ? " 'unsafe-eval'" : ''}`,
    "style-src 'self' 'unsafe-inline'",
    "img-src 'self' data: blob:",
    "font-src 'self'",
    `connect-src 'self'${s3Origin ? ` ${s3Origin}` : ''}`,
    "frame-ancestors 'none'",
    "base-uri 'self'",
    "form-action 'self'",
    "object-src 'none'",
  ].join('; ');
  return {
    'Content-Security-Policy': csp,
    'X-Frame-Options': 'DENY',
    'X-Content-Type-Options': 'nosniff',
    'Referrer-Policy': 'strict-origin-when-cross-origin',
    'Permissions-Policy': 'camera=(), microphone=(), geolocation=()',
  };
}

function originOf(url: string | undefined): string | undefined {
  if (!url) return undefined;
  try {
    return new URL(url).origin;
  } catch {
    return undefined;
  }
}
