/** Creates the project the API benchmark posts to and prints a CI token for it (last line). */
import { closeDb } from '@/db/client';
import { ensureProject, ensureWorkspace } from '@/src/server/queries/projects';
import { issueToken } from '@/src/server/services/tokens';

const ws = await ensureWorkspace({ slug: 'bench', name: 'Benchmark workspace' });
const project = await ensureProject({ workspaceId: ws.id, slug: 'loadtest', name: 'Load test project' });
const token = await issueToken({ workspaceId: ws.id, projectId: project.id, name: 'bench' });
console.log(token.token);
await closeDb();
