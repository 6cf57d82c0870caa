import type { NextConfig } from 'next';

// Security headers for every response. The CSP allows inline styles (React style props, d3) and
// connections to the object store for presigned browser uploads; scripts only from this origin
// (Next's inline bootstrap needs 'unsafe-inline' without a nonce set-up).
const s3Origin = process.env.S3_PUBLIC_ENDPOINT ?? process.env.S3_ENDPOINT ?? '';
const isDev = process.env.NODE_ENV !== 'production';
const csp = [
  "default-src 'self'",
  `script-src 'self' 'unsafe-inline'${isDev ? " 'unsafe-eval'" : ''}`,
  "style-src 'self' 'unsafe-inline'",
  "img-src 'self' data: blob:",
  "font-src 'self'",
  `connect-src 'self' ${s3Origin}`.trim(),
  "frame-ancestors 'none'",
  "base-uri 'self'",
  "form-action 'self'",
  "object-src 'none'",
].join('; ');

const nextConfig: NextConfig = {
  distDir: process.env.NEXT_DIST_DIR ?? '.next',
  poweredByHeader: false,
  // `npm test` type-checks the whole repository with `tsc --noEmit` before it builds; repeating
  // it inside `next build` only slows `npm start` down.
  typescript: { ignoreBuildErrors: true },
  // Packages with native, wasm or worker-thread parts run from node_modules, not the bundle.
  serverExternalPackages: ['h5wasm', 'pino', 'pino-pretty', 'thread-stream', 'nodemailer', 'postgres', 'papaparse'],
  async headers() {
    return [
      {
        source: '/:path*',
        headers: [
          { key: 'Content-Security-Policy', value: csp },
          { key: 'X-Frame-Options', value: 'DENY' },
          { key: 'X-Content-Type-Options', value: 'nosniff' },
          { key: 'Referrer-Policy', value: 'strict-origin-when-cross-origin' },
          { key: 'Permissions-Policy', value: 'camera=(), microphone=(), geolocation=()' },
        ],
      },
    ];
  },
};

export default nextConfig;
