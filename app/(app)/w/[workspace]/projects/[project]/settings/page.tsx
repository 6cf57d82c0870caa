import type { Metadata } from 'next';
import Link from 'next/link';
import { ProjectSettingsForm } from '@/src/components/policy/project-settings-form';
import { Card } from '@/src/components/ui/card';
import { policyToFormValues } from '@/src/schemas/policy-form';
import { requireMember } from '@/src/server/auth/session';
import { getProjectSettingsPage } from '@/src/server/services/policies';
import { saveProjectSettingsAction } from './actions';

export const metadata: Metadata = { title: 'Project settings' };
export const dynamic = 'force-dynamic';

/** Maintainers only: a viewer gets the same 404 as for a project that does not exist. */
export default async function ProjectSettingsPage({
  params,
}: {
  params: Promise<{ workspace: string; project: string }>;
}) {
  const { workspace, project: slug } = await params;
  const ctx = await requireMember(workspace, 'maintainer');
  const { project } = await getProjectSettingsPage(ctx, slug);
  const base = `/w/${workspace}/projects/${encodeURIComponent(project.slug)}`;
  return (
    <div className="space-y-6">
      <div>
        <p className="text-sm text-slate-500 dark:text-slate-400">
          <Link href={`/w/${workspace}`} className="hover:underline">
            Overview
          </Link>{' '}
          /{' '}
          <Link href={base} className="hover:underline">
            {project.name}
          </Link>{' '}
          / settings
        </p>
        <h1 className="text-2xl font-semibold">Project settings</h1>
        <p className="mt-1 text-sm text-slate-500 dark:text-slate-400">
          Slug <span className="font-mono">{project.slug}</span> (used by CI uploads; it does not change).
        </p>
      </div>
      <Card>
        <ProjectSettingsForm
          workspace={workspace}
          project={project.slug}
          initialName={project.name}
          initialDefaultBranch={project.defaultBranch}
          initialValues={policyToFormValues(project.defaultPolicy)}
          saveAction={saveProjectSettingsAction}
        />
      </Card>
    </div>
  );
}
