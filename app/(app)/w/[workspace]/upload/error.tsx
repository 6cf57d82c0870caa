'use client';

import { Button } from '@/src/components/ui/button';
import { Notice } from '@/src/components/ui/notice';

export default function UploadError({ reset }: { error: Error & { digest?: string }; reset: () => void }) {
  return (
    <div className="space-y-3">
      <Notice tone="error">The upload page could not be loaded; the problem has been logged.</Notice>
      <Button variant="secondary" onClick={reset}>
        Try again
      </Button>
    </div>
  );
}
