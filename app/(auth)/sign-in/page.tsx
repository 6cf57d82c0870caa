import type { Metadata } from 'next';
import { redirect } from 'next/navigation';
import { Card } from '@/src/components/ui/card';
import { Notice } from '@/src/components/ui/notice';
import { getSessionUser } from '@/src/server/auth/session';
import { PasswordSignInForm, SignInLinkForm } from '../_components/auth-forms';

export const metadata: Metadata = { title: 'Sign in' };
export const dynamic = 'force-dynamic';

export default async function SignInPage({
  searchParams,
}: {
  searchParams: Promise<Record<string, string | string[] | undefined>>;
}) {
  const params = await searchParams;
  const next =
    typeof params.next === 'string' && params.next.startsWith('/') && !params.next.startsWith('//') ? params.next : '/';
  if (await getSessionUser()) redirect(next);
  return (
    <div className="space-y-6">
      <h1 className="text-2xl font-semibold">Sign in</h1>
      {params.reset ? <Notice tone="success">Your password was changed. Sign in with the new one.</Notice> : null}
      {params.code === 'rate_limited' ? <Notice tone="error">Too many failed attempts. Wait 15 minutes.</Notice> : null}
      <Card>
        <PasswordSignInForm next={next} />
      </Card>
      <Card title="No password at hand?">
        <SignInLinkForm />
      </Card>
    </div>
  );
}
