import type { Metadata } from 'next';
import { defaultBuildKey } from '@/src/components/upload/upload-manifest';
import { UploadForm } from '@/src/components/upload/upload-form';
import { Card } from '@/src/components/ui/card';
import { requireMember } from '@/src/server/auth/session';
import { getUploadTargets } from '@/src/server/services/policies';

export const metadata: Metadata = { title: 'Upload' };
export const dynamic = 'force-dynamic';

/** Manual upload, for maintainers (the API refuses viewers too): try a fix without a CI build. */
export default async function UploadPage({ params }: { params: Promise<{ workspace: string }> }) {
  const { workspace } = await params;
  const ctx = await requireMember(workspace, 'maintainer');
  const projects = await getUploadTargets(ctx);
  return (
    <div className="space-y-6">
      <div>
        <h1 className="text-2xl font-semibold">Upload a snapshot file</h1>
        <p className="mt-1 max-w-3xl text-sm text-slate-600 dark:text-slate-300">
          The file goes straight to object storage, then it is analysed and judged like a CI upload, with the
          case&apos;s policy and baseline.
        </p>
      </div>
      <Card>
        <UploadForm workspace={ctx.workspace.slug} projects={projects} defaultBuild={defaultBuildKey(new Date())} />
      </Card>
    </div>
  );
}
