import type { Metadata } from 'next';
import type { ReactNode } from 'react';
import { ThemeSync, themeScript } from '@/src/components/shell/theme-toggle';
import { mono, sans } from './fonts';
import './globals.css';

export const metadata: Metadata = {
  title: { default: 'Varigate', template: '%s · Varigate' },
  description: 'Regression gate for numerical simulation codes',
};

export default function RootLayout({ children }: { children: ReactNode }) {
  return (
    <html lang="en" className={`${sans.variable} ${mono.variable}`} suppressHydrationWarning>
      <head>
        <script dangerouslySetInnerHTML={{ __html: themeScript }} />
      </head>
      <body className="min-h-screen font-sans">
        <ThemeSync />
        {children}
      </body>
    </html>
  );
}
