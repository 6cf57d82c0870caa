'use client';

import { Button } from '@/src/components/ui/button';
import { Notice } from '@/src/components/ui/notice';

export default function CaseError({ reset }: { error: Error & { digest?: string }; reset: () => void }) {
  return (
    <div className="space-y-3">
      <Notice tone="error">This case could not be loaded. Nothing was changed; the problem has been logged.</Notice>
      <Button variant="secondary" onClick={reset}>
        Try again
      </Button>
    </div>
  );
}
