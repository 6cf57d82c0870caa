import type { Config } from 'tailwindcss';

// Loaded by app/globals.css through `@config`. Verdict colours are named after the verdicts so
// components say `bg-verdict-fail`, not a hue.
const config: Config = {
  content: ['./app/**/*.{ts,tsx}', './src/components/**/*.{ts,tsx}'],
  darkMode: 'class',
  theme: {
    extend: {
      fontFamily: {
        sans: ['var(--font-sans)', 'system-ui', 'sans-serif'],
        mono: ['var(--font-mono)', 'ui-monospace', 'monospace'],
      },
      colors: {
        verdict: {
          pass: '#15803d',
          warn: '#b45309',
          fail: '#b91c1c',
          error: '#6b21a8',
        },
        ink: { DEFAULT: '#0f172a', muted: '#475569' },
      },
    },
  },
};

export default config;
