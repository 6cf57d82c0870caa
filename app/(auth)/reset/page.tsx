import type { Metadata } from 'next';
import { Card } from '@/src/components/ui/card';
import { ResetRequestForm } from '../_components/auth-forms';

export const metadata: Metadata = { title: 'Reset your password' };

export default function ResetPage() {
  return (
    <div className="space-y-6">
      <h1 className="text-2xl font-semibold">Reset your password</h1>
      <Card>
        <ResetRequestForm />
      </Card>
    </div>
  );
}
