import type { NextConfig } from 'next';

const nextConfig: NextConfig = {
  distDir: process.env.NEXT_DIST_DIR ?? '.next',
  poweredByHeader: false,
  // `npm test` type-checks the whole repository with `tsc --noEmit` before it builds; repeating
  // it inside `next build` only slows `npm start` down.
  typescript: { ignoreBuildErrors: true },
  // Packages with native, wasm or worker-thread parts run from node_modules, not the bundle.
  serverExternalPackages: ['h5wasm', 'pino', 'pino-pretty', 'thread-stream', 'nodemailer', 'postgres', 'papaparse'],
};

export default nextConfig;
