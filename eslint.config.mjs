import { defineConfig, globalIgnores } from 'eslint/config';
import nextVitals from 'eslint-config-next/core-web-vitals';
import nextTs from 'eslint-config-next/typescript';
import drizzle from 'eslint-plugin-drizzle';

export default defineConfig([
  ...nextVitals,
  ...nextTs,
  globalIgnores([
    '.next/**',
    '.next-test*/**',
    '.data/**',
    'node_modules/**',
    'next-env.d.ts',
    'migrations/**',
    'fixtures/**',
  ]),
  {
    // A delete or update without `where` on a drizzle table is almost always a bug.
    plugins: { drizzle },
    rules: {
      'drizzle/enforce-delete-with-where': ['error', { drizzleObjectName: ['db', 'tx'] }],
      'drizzle/enforce-update-with-where': ['error', { drizzleObjectName: ['db', 'tx'] }],
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_' }],
    },
  },
  {
    // Layering: the numeric core stays pure (CONVENTIONS.md).
    files: ['src/analysis/**/*.ts'],
    rules: {
      'no-restricted-imports': [
        'error',
        {
          patterns: [
            {
              group: ['next', 'next/*', 'react', 'react-dom', '@/db/*', '@/src/server/*', 'node:*', 'fs', 'postgres'],
              message: 'src/analysis is pure: no I/O, no framework.',
            },
          ],
        },
      ],
    },
  },
  {
    files: ['app/**/*.{ts,tsx}'],
    rules: {
      'no-restricted-imports': [
        'error',
        {
          patterns: [
            {
              group: ['@/db/*', 'drizzle-orm', 'drizzle-orm/*'],
              message: 'app/ goes through services in src/server; no SQL here.',
            },
          ],
        },
      ],
    },
  },
  {
    files: ['scripts/**/*.{mjs,ts}'],
    rules: { 'no-console': 'off' },
  },
]);
