import { randomUUID } from 'node:crypto';
import fs from 'node:fs';
import { beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { revokeToken } from '@/src/server/queries/tokens';
import { createTestProject, fixturePath, postRun, waitForRun, type TestProject } from '../support/api';
import { appUrl } from '../support/env';

const laxWendroff = fixturePath('snapshots', 'tophat-lax-wendroff.csv');
const vanLeer = fixturePath('snapshots', 'tophat-van-leer.csv');
const notNumeric = fixturePath('snapshots', 'not-numeric.csv');

describe('CI token authentication', () => {
  let project: TestProject;
  beforeAll(async () => {
    project = await createTestProject();
  });

  it('answers 401 without an Authorization header', async () => {
    const res = await request(appUrl()).get(`/api/v1/runs/${randomUUID()}`);
    expect(res.status).toBe(401);
    expect(res.body.error.code).toBe('unauthorized:token');
    expect(res.body.error.message).toMatch(/Authorization/);
  });

  it('answers 401 for an unknown token of the right shape', async () => {
    const fake = `vgt_00000000_${'A'.repeat(43)}`;
    const res = await request(appUrl()).get(`/api/v1/runs/${randomUUID()}`).set('Authorization', `Bearer ${fake}`);
    expect(res.status).toBe(401);
    expect(res.body.error.message).toMatch(/Unknown or revoked/);
  });

  it('answers 401 for a revoked token', async () => {
    const other = await createTestProject('revoked-case');
    expect(await revokeToken({ id: other.tokenId, workspaceId: other.workspaceId })).toBe(true);
    const res = await postRun(other.token, { build: 'b1', case: 'c1' }, { path: vanLeer });
    expect(res.status).toBe(401);
  });

  it('answers 403 when a token names another project', async () => {
    const res = await request(appUrl())
      .get('/api/v1/builds/nightly-1?project=some-other-project')
      .set('Authorization', `Bearer ${project.token}`);
    expect(res.status).toBe(403);
    expect(res.body.error.code).toBe('forbidden:project');
  });

  it("answers 404 for another project's run, as for a run that does not exist", async () => {
    const other = await createTestProject('otter-bay');
    const posted = await postRun(other.token, { build: 'b1', case: 'tophat' }, { path: vanLeer });
    expect(posted.status).toBe(202);
    const res = await request(appUrl())
      .get(`/api/v1/runs/${posted.body.run.id}`)
      .set('Authorization', `Bearer ${project.token}`);
    expect(res.status).toBe(404);
    expect(res.body.error.code).toBe('not_found:run');
  });

  it('refuses baseline acceptance with a CI token (upload-and-read only)', async () => {
    const res = await request(appUrl())
      .post('/api/v1/cases/tophat/baseline')
      .set('Authorization', `Bearer ${project.token}`)
      .send({ run: randomUUID() });
    expect(res.status).toBe(403);
    expect(res.body.error.code).toBe('forbidden:token');
  });
});

describe('POST /api/v1/runs and the analysis worker', () => {
  let project: TestProject;
  beforeAll(async () => {
    project = await createTestProject();
  });

  it('answers 202 with a queued run, then the Lax-Wendroff top hat ends in fail with a located TV-growth finding', async () => {
    const res = await postRun(project.token, { build: 'nightly-101', case: 'tophat-lw' }, { path: laxWendroff });
    expect(res.status).toBe(202);
    expect(res.body.run.status).toBe('queued');
    expect(res.body.run.url).toContain(`/api/v1/runs/${res.body.run.id}`);
    const report = await waitForRun(project.token, res.body.run.id);
    expect(report.run.verdict).toBe('fail');
    const tv = report.findings.find((f: { kind: string }) => f.kind === 'tv-growth');
    expect(tv).toBeDefined();
    expect(tv.location).toBeTruthy();
    expect(tv.message).toMatch(/TV/);
    expect(report.note).toMatch(/does not validate/);
  });

  it('passes the van Leer limited top hat', async () => {
    const res = await postRun(project.token, { build: 'nightly-101', case: 'tophat-vl' }, { path: vanLeer });
    expect(res.status).toBe(202);
    const report = await waitForRun(project.token, res.body.run.id);
    expect(report.run.verdict).toBe('pass');
    expect(report.findings.filter((f: { severity: string }) => f.severity === 'fail')).toEqual([]);
  });

  it('makes one run for a retried POST with the same Idempotency-Key', async () => {
    const key = randomUUID();
    const first = await postRun(project.token, { build: 'nightly-102', case: 'retry' }, { path: vanLeer }, key);
    const second = await postRun(project.token, { build: 'nightly-102', case: 'retry' }, { path: vanLeer }, key);
    expect(first.status).toBe(202);
    expect(second.status).toBe(200);
    expect(second.body.run.id).toBe(first.body.run.id);
    const build = await request(appUrl())
      .get('/api/v1/builds/nightly-102')
      .set('Authorization', `Bearer ${project.token}`);
    expect(build.body.runs).toHaveLength(1);
  });

  it('refuses a reused Idempotency-Key with a different file (409)', async () => {
    const key = randomUUID();
    await postRun(project.token, { build: 'nightly-103', case: 'retry' }, { path: vanLeer }, key);
    const res = await postRun(project.token, { build: 'nightly-103', case: 'retry' }, { path: laxWendroff }, key);
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('conflict:idempotency');
  });

  it("ends a corrupt file in verdict error with the reader's message, never a 500", async () => {
    const res = await postRun(project.token, { build: 'nightly-104', case: 'corrupt' }, { path: notNumeric });
    expect(res.status).toBe(202);
    const report = await waitForRun(project.token, res.body.run.id);
    expect(report.run.status).toBe('error');
    expect(report.run.verdict).toBe('error');
    expect(report.run.errorMessage).toMatch(/line \d+/i);
  });

  it('answers 400 naming the field for a missing case and an invalid manifest', async () => {
    const noCase = await request(appUrl())
      .post('/api/v1/runs')
      .set('Authorization', `Bearer ${project.token}`)
      .field('build', 'b')
      .field('commit', 'c')
      .field('branch', 'main')
      .attach('file', vanLeer);
    expect(noCase.status).toBe(400);
    expect(noCase.body.error.message).toMatch(/^case/);
    const badManifest = await postRun(
      project.token,
      { build: 'b', case: 'x', manifest: { variables: [] } },
      { path: vanLeer },
    );
    expect(badManifest.status).toBe(400);
    expect(badManifest.body.error.code).toBe('invalid:run');
    expect(badManifest.body.error.message).toMatch(/manifest\.variables/);
  });

  it('answers 400 for a request without a file and for a body that is not multipart or JSON', async () => {
    const noFile = await request(appUrl())
      .post('/api/v1/runs')
      .set('Authorization', `Bearer ${project.token}`)
      .field('build', 'b')
      .field('commit', 'c')
      .field('branch', 'main')
      .field('case', 'x');
    expect(noFile.status).toBe(400);
    expect(noFile.body.error.message).toMatch(/file/);
    const text = await request(appUrl())
      .post('/api/v1/runs')
      .set('Authorization', `Bearer ${project.token}`)
      .set('content-type', 'text/plain')
      .send('hello');
    expect(text.status).toBe(400);
  });

  it('refuses a build key reused for another commit (409)', async () => {
    await postRun(project.token, { build: 'nightly-105', commit: 'aaaa111', case: 'x' }, { path: vanLeer });
    const res = await postRun(project.token, { build: 'nightly-105', commit: 'bbbb222', case: 'y' }, { path: vanLeer });
    expect(res.status).toBe(409);
    expect(res.body.error.message).toMatch(/aaaa111/);
  });

  it('works end to end through a presigned upload', async () => {
    const content = fs.readFileSync(laxWendroff);
    const presign = await request(appUrl())
      .post('/api/v1/uploads')
      .set('Authorization', `Bearer ${project.token}`)
      .send({ fileName: 'tophat-lax-wendroff.csv', size: content.length, contentType: 'text/csv' });
    expect(presign.status).toBe(201);
    const { url, objectKey, headers } = presign.body.upload;
    const put = await fetch(url, { method: 'PUT', body: content, headers });
    expect(put.status).toBe(200);
    const res = await request(appUrl())
      .post('/api/v1/runs')
      .set('Authorization', `Bearer ${project.token}`)
      .send({ build: 'nightly-106', commit: 'c0ffee1', branch: 'main', case: 'presigned-lw', objectKey });
    expect(res.status).toBe(202);
    const report = await waitForRun(project.token, res.body.run.id);
    expect(report.run.verdict).toBe('fail');
  });

  it("refuses an objectKey that was not issued to the token's project", async () => {
    const other = await createTestProject('elsewhere');
    const res = await request(appUrl())
      .post('/api/v1/runs')
      .set('Authorization', `Bearer ${project.token}`)
      .send({
        build: 'b',
        commit: 'c',
        branch: 'main',
        case: 'x',
        objectKey: `incoming/${other.workspaceId}/${other.projectId}/x/file.csv`,
      });
    expect(res.status).toBe(403);
  });

  it("reports a build's verdict as the worst of its runs", async () => {
    const a = await postRun(project.token, { build: 'nightly-107', case: 'good' }, { path: vanLeer });
    const b = await postRun(project.token, { build: 'nightly-107', case: 'bad' }, { path: laxWendroff });
    await waitForRun(project.token, a.body.run.id);
    await waitForRun(project.token, b.body.run.id);
    const res = await request(appUrl())
      .get('/api/v1/builds/nightly-107')
      .set('Authorization', `Bearer ${project.token}`);
    expect(res.status).toBe(200);
    expect(res.body.build.verdict).toBe('fail');
    expect(res.body.build.finished).toBe(true);
    expect(res.body.runs.map((r: { case: string; verdict: string }) => [r.case, r.verdict])).toEqual([
      ['bad', 'fail'],
      ['good', 'pass'],
    ]);
  });

  it('serves the per-step series and a decimated step of a finished run', async () => {
    const res = await postRun(project.token, { build: 'nightly-108', case: 'series' }, { path: laxWendroff });
    const report = await waitForRun(project.token, res.body.run.id);
    const variable = report.variables[0].name as string;
    const series = await request(appUrl())
      .get(`/api/v1/runs/${res.body.run.id}/series?variable=${variable}`)
      .set('Authorization', `Bearer ${project.token}`);
    expect(series.status).toBe(200);
    expect(series.body.variable).toBe(variable);
    expect(series.body.series.index.length).toBeGreaterThan(1);
    expect(series.body.series.tv.length).toBe(series.body.series.index.length);
    const stepIndex = series.body.series.index[1];
    const step = await request(appUrl())
      .get(`/api/v1/runs/${res.body.run.id}/steps/${stepIndex}?variable=${variable}&points=32`)
      .set('Authorization', `Bearer ${project.token}`);
    expect(step.status).toBe(200);
    expect(step.body.values.length).toBeLessThanOrEqual(32);
    expect(step.body.values.length).toBe(step.body.index.length);
    const missing = await request(appUrl())
      .get(`/api/v1/runs/${res.body.run.id}/steps/999999?variable=${variable}`)
      .set('Authorization', `Bearer ${project.token}`);
    expect(missing.status).toBe(404);
  });

  it('reads HDF5 uploads: the float64 Lax-Wendroff file fails, the float32 van Leer file passes, and a step is served from HDF5', async () => {
    const lw = await postRun(
      project.token,
      { build: 'nightly-109', case: 'h5-lw' },
      { path: fixturePath('snapshots', 'tophat-lax-wendroff.h5') },
    );
    const vl = await postRun(
      project.token,
      { build: 'nightly-109', case: 'h5-vl' },
      { path: fixturePath('snapshots', 'tophat-van-leer-float32.h5') },
    );
    expect(lw.status).toBe(202);
    const lwReport = await waitForRun(project.token, lw.body.run.id);
    const vlReport = await waitForRun(project.token, vl.body.run.id);
    expect(lwReport.run.verdict).toBe('fail');
    expect(vlReport.run.verdict).toBe('pass');
    expect(vlReport.variables[0].precision).toBe('float32');
    const series = await request(appUrl())
      .get(`/api/v1/runs/${lw.body.run.id}/series`)
      .set('Authorization', `Bearer ${project.token}`);
    const step = await request(appUrl())
      .get(`/api/v1/runs/${lw.body.run.id}/steps/${series.body.series.index[2]}?points=64`)
      .set('Authorization', `Bearer ${project.token}`);
    expect(step.status).toBe(200);
    expect(step.body.values.length).toBeGreaterThan(0);
  });

  it('ends a truncated HDF5 file in verdict error naming the problem', async () => {
    const res = await postRun(
      project.token,
      { build: 'nightly-110', case: 'h5-truncated' },
      { path: fixturePath('snapshots', 'truncated.h5') },
    );
    const report = await waitForRun(project.token, res.body.run.id);
    expect(report.run.verdict).toBe('error');
    expect(report.run.errorMessage).toMatch(/HDF5|truncated/i);
  });
});
