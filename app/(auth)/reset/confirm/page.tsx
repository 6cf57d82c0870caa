import type { Metadata } from 'next';
import { Card } from '@/src/components/ui/card';
import { Notice } from '@/src/components/ui/notice';
import { NewPasswordForm } from '../../_components/auth-forms';

export const metadata: Metadata = { title: 'Choose a new password' };
export const dynamic = 'force-dynamic';

export default async function ResetConfirmPage({ searchParams }: { searchParams: Promise<{ token?: string }> }) {
  const { token } = await searchParams;
  return (
    <div className="space-y-6">
      <h1 className="text-2xl font-semibold">Choose a new password</h1>
      <Card>
        {token ? (
          <NewPasswordForm token={token} />
        ) : (
          <Notice tone="error">This link is incomplete. Ask for a new one.</Notice>
        )}
      </Card>
    </div>
  );
}
