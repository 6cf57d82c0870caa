import fs from 'node:fs';
import { describe, expect, it } from 'vitest';
import request from 'supertest';
import { headObject } from '@/src/server/storage';
import { sweepOrphanUploads } from '@/src/server/services/upload-sweep';
import { createTestProject, fixturePath, postRun, waitForRun } from '../support/api';
import { appUrl } from '../support/env';

async function presignAndPut(token: string, content: Buffer): Promise<string> {
  const presign = await request(appUrl())
    .post('/api/v1/uploads')
    .set('Authorization', `Bearer ${token}`)
    .send({ fileName: 'abandoned.csv', size: content.length, contentType: 'text/csv' });
  const { url, objectKey, headers } = presign.body.upload;
  const put = await fetch(url, { method: 'PUT', body: new Uint8Array(content), headers });
  expect(put.status).toBe(200);
  return objectKey as string;
}

describe('sweeping uploads that no run refers to', () => {
  it('removes an abandoned presigned upload once old enough, and never the file of a run', async () => {
    const project = await createTestProject('drowned-lane');
    const content = fs.readFileSync(fixturePath('snapshots', 'tophat-van-leer.csv'));
    const abandoned = await presignAndPut(project.token, content);
    const posted = await postRun(
      project.token,
      { build: 'b1', case: 'kept' },
      { path: fixturePath('snapshots', 'tophat-van-leer.csv') },
    );
    const report = await waitForRun(project.token, posted.body.run.id);
    expect(report.run.verdict).toBe('pass');

    // Young objects stay: their run may still be on its way.
    await sweepOrphanUploads({ olderThanMs: 3600_000 });
    expect(await headObject(abandoned)).toBeDefined();

    const removed = await sweepOrphanUploads({ olderThanMs: 0 });
    expect(removed).toBeGreaterThanOrEqual(1);
    expect(await headObject(abandoned)).toBeUndefined();
    // The run's own file is still there: its raw-file link keeps working.
    const file = await request(appUrl())
      .get(`/api/v1/runs/${posted.body.run.id}/file`)
      .set('Authorization', `Bearer ${project.token}`)
      .redirects(0);
    expect(file.status).toBe(302);
    const stored = await fetch(file.headers.location as string);
    expect(stored.status).toBe(200);
  });
});
