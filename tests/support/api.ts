import { randomUUID } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import request from 'supertest';
import { ensureProject, ensureWorkspace } from '@/src/server/queries/projects';
import { issueToken } from '@/src/server/services/tokens';
import { appUrl } from './env';

export interface TestProject {
  workspaceId: string;
  workspaceSlug: string;
  projectId: string;
  slug: string;
  token: string;
  tokenId: string;
}

/** A fresh workspace with one project and a CI token, named so runs never collide. */
export async function createTestProject(slug = 'saltmarsh'): Promise<TestProject> {
  const suffix = randomUUID().slice(0, 8);
  const workspaceSlug = `test-${suffix}`;
  const ws = await ensureWorkspace({ slug: workspaceSlug, name: `Test workspace ${suffix}` });
  const project = await ensureProject({ workspaceId: ws.id, slug, name: `Saltmarsh tracer model ${suffix}` });
  const issued = await issueToken({ workspaceId: ws.id, projectId: project.id, name: 'test' });
  return { workspaceId: ws.id, workspaceSlug, projectId: project.id, slug, token: issued.token, tokenId: issued.id };
}

export const fixturePath = (...parts: string[]): string => path.join(process.cwd(), 'fixtures', ...parts);
export const fixtureExists = (...parts: string[]): boolean => fs.existsSync(fixturePath(...parts));

export interface PostRunFields {
  build: string;
  commit?: string;
  branch?: string;
  case: string;
  manifest?: unknown;
  format?: string;
}

/** Posts a run as a CI job would (multipart), from a file on disk or an in-memory buffer. */
export function postRun(
  token: string,
  fields: PostRunFields,
  file: { path: string } | { name: string; content: Buffer | string },
  idempotencyKey?: string,
) {
  let req = request(appUrl()).post('/api/v1/runs').set('Authorization', `Bearer ${token}`);
  if (idempotencyKey) req = req.set('Idempotency-Key', idempotencyKey);
  req = req
    .field('build', fields.build)
    .field('commit', fields.commit ?? 'a1b2c3d')
    .field('branch', fields.branch ?? 'main')
    .field('case', fields.case);
  if (fields.format) req = req.field('format', fields.format);
  if (fields.manifest !== undefined) req = req.field('manifest', JSON.stringify(fields.manifest));
  if ('path' in file) return req.attach('file', file.path);
  return req.attach('file', Buffer.from(file.content), file.name);
}

/** Polls GET /api/v1/runs/:id until the run is done or in error. */
export async function waitForRun(token: string, id: string, timeoutMs = 60_000) {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const res = await request(appUrl()).get(`/api/v1/runs/${id}`).set('Authorization', `Bearer ${token}`);
    if (res.status !== 200) throw new Error(`GET run answered ${res.status}: ${JSON.stringify(res.body)}`);
    if (res.body.run.status === 'done' || res.body.run.status === 'error') return res.body;
    if (Date.now() > deadline) throw new Error(`run ${id} still ${res.body.run.status} after ${timeoutMs} ms`);
    await new Promise((r) => setTimeout(r, 200));
  }
}
