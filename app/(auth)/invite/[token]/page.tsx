import type { Metadata } from 'next';
import Link from 'next/link';
import { Card } from '@/src/components/ui/card';
import { Notice } from '@/src/components/ui/notice';
import { getSessionUser } from '@/src/server/auth/session';
import { describeInvitation } from '@/src/server/services/accounts';
import { JoinForm } from '../../_components/auth-forms';

export const metadata: Metadata = { title: 'Invitation' };
export const dynamic = 'force-dynamic';

export default async function InvitePage({ params }: { params: Promise<{ token: string }> }) {
  const { token } = await params;
  const found = await describeInvitation(token);
  if (!found) {
    return (
      <div className="space-y-6">
        <h1 className="text-2xl font-semibold">Invitation</h1>
        <Notice tone="error">
          This invitation has expired, was revoked or was already used. Ask the workspace admin for a new one.
        </Notice>
      </div>
    );
  }
  const user = await getSessionUser();
  const { invitation, workspaceName } = found;
  return (
    <div className="space-y-6">
      <h1 className="text-2xl font-semibold">Join {workspaceName}</h1>
      <p className="text-slate-600 dark:text-slate-300">
        You are invited as <strong>{invitation.role}</strong> ({invitation.email}).
      </p>
      <Card>
        {user && user.email !== invitation.email ? (
          <Notice tone="error">
            You are signed in as {user.email}, but this invitation is for {invitation.email}. Sign out first.
          </Notice>
        ) : user ? (
          <JoinForm token={token} needsAccount={false} email={invitation.email} />
        ) : (
          <div className="space-y-4">
            <JoinForm token={token} needsAccount email={invitation.email} />
            <p className="text-sm text-slate-500">
              Already have an account for {invitation.email}?{' '}
              <Link
                className="text-sky-700 hover:underline"
                href={`/sign-in?next=${encodeURIComponent(`/invite/${token}`)}`}
              >
                Sign in first
              </Link>
              .
            </p>
          </div>
        )}
      </Card>
    </div>
  );
}
