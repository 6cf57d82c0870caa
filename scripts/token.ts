/**
 * `npm run token -- --project <slug> --name <name> [--workspace <slug>]`: issues a CI token for a
 * project and prints it once. Only its hash is stored; a lost token is revoked and replaced.
 */
import { parseArgs } from 'node:util';
import { closeDb } from '@/db/client';
import { findProjectForCli, issueToken } from '@/src/server/services/tokens';

async function main(): Promise<number> {
  const { values } = parseArgs({
    options: { project: { type: 'string' }, name: { type: 'string' }, workspace: { type: 'string' } },
  });
  if (!values.project || !values.name) {
    console.error('usage: npm run token -- --project <slug> --name <name> [--workspace <slug>]');
    return 3;
  }
  const project = await findProjectForCli({ projectSlug: values.project, workspaceSlug: values.workspace });
  const issued = await issueToken({
    workspaceId: project.workspaceId,
    projectId: project.projectId,
    name: values.name,
  });
  console.log(
    `Token "${issued.name}" for project ${values.project} (shown once, store it as a CI secret):\n${issued.token}`,
  );
  return 0;
}

main()
  .then(async (code) => {
    await closeDb();
    process.exit(code);
  })
  .catch(async (err: unknown) => {
    console.error(`token: ${err instanceof Error ? err.message : String(err)}`);
    await closeDb();
    process.exit(1);
  });
