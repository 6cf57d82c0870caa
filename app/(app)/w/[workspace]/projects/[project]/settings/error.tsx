'use client';

import { Button } from '@/src/components/ui/button';
import { Notice } from '@/src/components/ui/notice';

export default function SettingsError({ reset }: { error: Error & { digest?: string }; reset: () => void }) {
  return (
    <div className="space-y-3">
      <Notice tone="error">The project settings could not be loaded. Nothing was changed.</Notice>
      <Button variant="secondary" onClick={reset}>
        Try again
      </Button>
    </div>
  );
}
