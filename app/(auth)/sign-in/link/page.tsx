import type { Metadata } from 'next';
import { Card } from '@/src/components/ui/card';
import { Notice } from '@/src/components/ui/notice';
import { ConfirmLinkForm } from '../../_components/auth-forms';

export const metadata: Metadata = { title: 'Sign in with a link' };
export const dynamic = 'force-dynamic';

/**
 * The page a sign-in link opens. Signing in takes a click: mail scanners that fetch every link
 * in a message must not spend the one-time token.
 */
export default async function SignInLinkPage({ searchParams }: { searchParams: Promise<{ token?: string }> }) {
  const { token } = await searchParams;
  return (
    <div className="space-y-6">
      <h1 className="text-2xl font-semibold">Sign in with your link</h1>
      <Card>
        {token ? (
          <ConfirmLinkForm token={token} />
        ) : (
          <Notice tone="error">This link is incomplete. Ask for a new one on the sign-in page.</Notice>
        )}
      </Card>
    </div>
  );
}
