'use client';

import { useEffect, useSyncExternalStore } from 'react';

type Theme = 'light' | 'dark';

// The theme lives on <html class="dark">; read it from there so the button and the page agree.
function subscribe(onChange: () => void): () => void {
  const observer = new MutationObserver(onChange);
  observer.observe(document.documentElement, { attributes: true, attributeFilter: ['class'] });
  return () => observer.disconnect();
}
const currentTheme = (): Theme => (document.documentElement.classList.contains('dark') ? 'dark' : 'light');

/** Switches the light and dark themes; the choice is kept in this browser only. */
export function ThemeToggle() {
  const theme = useSyncExternalStore(subscribe, currentTheme, () => 'light' as Theme);
  const next: Theme = theme === 'dark' ? 'light' : 'dark';
  return (
    <button
      type="button"
      className="rounded-md px-2 py-1 text-sm text-slate-600 hover:bg-slate-100 dark:text-slate-300 dark:hover:bg-slate-800"
      aria-label={`Switch to the ${next} theme`}
      onClick={() => {
        document.documentElement.classList.toggle('dark', next === 'dark');
        localStorage.setItem('varigate-theme', next);
      }}
    >
      {theme === 'dark' ? 'Light' : 'Dark'}
    </button>
  );
}

/** Applied before the first paint, so a dark-theme user never sees a white flash. */
export const themeScript = `try{var t=localStorage.getItem('varigate-theme');if(t==='dark'||(!t&&matchMedia('(prefers-color-scheme: dark)').matches))document.documentElement.classList.add('dark')}catch(e){}`;

function wantsDark(): boolean {
  const stored = localStorage.getItem('varigate-theme');
  return stored === 'dark' || (!stored && matchMedia('(prefers-color-scheme: dark)').matches);
}

/**
 * Re-applies the theme once React has taken over the page. If React ever renders <html> afresh
 * (it does after a hydration mismatch anywhere on the page), the class the early script set is
 * gone; this puts it back.
 */
export function ThemeSync() {
  useEffect(() => {
    document.documentElement.classList.toggle('dark', wantsDark());
  }, []);
  return null;
}
