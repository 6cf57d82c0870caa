'use client';

import { useState } from 'react';
import { Button } from '../ui/button';

export type CopyButtonProps = { text: string; label?: string };

/** Copies `text` to the clipboard and says so; the clipboard needs a secure context, so say when it fails. */
export function CopyButton({ text, label = 'Copy' }: CopyButtonProps) {
  const [state, setState] = useState<'idle' | 'copied' | 'failed'>('idle');
  async function copy() {
    try {
      await navigator.clipboard.writeText(text);
      setState('copied');
    } catch {
      setState('failed');
    }
  }
  return (
    <span className="inline-flex items-center gap-2">
      <Button variant="secondary" onClick={copy}>
        {label}
      </Button>
      <span role="status" className="text-xs text-slate-500">
        {state === 'copied' ? 'Copied.' : state === 'failed' ? 'Could not copy: select the text instead.' : ''}
      </span>
    </span>
  );
}
