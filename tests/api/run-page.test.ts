import fs from 'node:fs';
import { beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { createTestProject, fixturePath, postRun, waitForRun, type TestProject } from '../support/api';
import { appUrl } from '../support/env';
import { createTestUser, signInCookie } from '../support/users';

/**
 * The read routes behind the run page: chart series, growth map, one step (with the optional
 * slice and cell window), raw file and metrics downloads. Each answers a member's session and the
 * project's CI token, 401 to nobody, and 404 for a run of a workspace the caller is not in.
 */
const laxWendroff = fixturePath('snapshots', 'tophat-lax-wendroff.csv');
const square2d = fixturePath('snapshots', 'square-superbee-2d.csv');
const manifest = { variableOptions: { u: { periodic: { x: true }, velocitySign: 1 } } };

interface Setup {
  project: TestProject;
  cookie: string;
  lineRun: string;
  planeRun: string;
  foreignRun: string;
  lineSteps: number[];
  planeSteps: number[];
}

let s: Setup;

beforeAll(async () => {
  const project = await createTestProject('kelpwater');
  const line = await postRun(
    project.token,
    { build: 'nightly-31', case: 'tophat-lw', manifest },
    { path: laxWendroff },
  );
  const plane = await postRun(project.token, { build: 'nightly-31', case: 'square-2d' }, { path: square2d });
  const other = await createTestProject('far-shore');
  const foreign = await postRun(
    other.token,
    { build: 'nightly-9', case: 'tophat-lw', manifest },
    { path: laxWendroff },
  );
  for (const [token, res] of [
    [project.token, line],
    [project.token, plane],
    [other.token, foreign],
  ] as const) {
    expect(res.status).toBe(202);
    await waitForRun(token, res.body.run.id);
  }
  const viewer = await createTestUser({ workspaceId: project.workspaceId, role: 'viewer' });
  const cookie = await signInCookie(viewer);
  const seriesOf = async (id: string) =>
    (await request(appUrl()).get(`/api/v1/runs/${id}/series`).set('Authorization', `Bearer ${project.token}`)).body
      .series.index as number[];
  s = {
    project,
    cookie,
    lineRun: line.body.run.id,
    planeRun: plane.body.run.id,
    foreignRun: foreign.body.run.id,
    lineSteps: await seriesOf(line.body.run.id),
    planeSteps: await seriesOf(plane.body.run.id),
  };
});

const get = (path: string, cookie?: string) => {
  const req = request(appUrl()).get(path);
  return cookie ? req.set('Cookie', cookie) : req;
};

/** 401 without credentials, 404 for another workspace's run with a member's session. */
async function expectGuarded(pathFor: (runId: string) => string): Promise<void> {
  const anonymous = await get(pathFor(s.lineRun));
  expect(anonymous.status).toBe(401);
  expect(anonymous.body.error.code).toMatch(/^unauthorized:/);
  const foreign = await get(pathFor(s.foreignRun), s.cookie);
  expect(foreign.status).toBe(404);
  expect(foreign.body.error.code).toBe('not_found:run');
}

describe('GET /api/v1/runs/:id/chart', () => {
  it('answers a member with every step of a short series and the TV band built from the fail threshold', async () => {
    const res = await get(`/api/v1/runs/${s.lineRun}/chart?variable=u`, s.cookie);
    expect(res.status).toBe(200);
    const body = res.body;
    expect(body.variable).toBe('u');
    expect(body.count).toBe(s.lineSteps.length);
    expect(body.complete).toBe(true);
    expect(body.step).toEqual(s.lineSteps);
    const { tv, tvFail, tvCeiling, tvPrevious } = body.columns;
    expect(tvFail[0]).toBeNull();
    for (let n = 1; n < tv.length; n++) {
      expect(tvPrevious[n]).toBe(tv[n - 1]);
      expect(tvCeiling[n]).toBeCloseTo(tv[n - 1] + tvFail[n], 12);
    }
    // Lax-Wendroff on a top hat raises TV above the band somewhere: that is its failure.
    expect(tv.some((v: number, n: number) => n > 0 && v > tvCeiling[n])).toBe(true);
    expect(body.bounds.lower).toBeLessThan(body.bounds.upper);
  });

  it('answers the CI token of the project too, and 404 naming the variables for an unknown one', async () => {
    const token = await request(appUrl())
      .get(`/api/v1/runs/${s.lineRun}/chart`)
      .set('Authorization', `Bearer ${s.project.token}`);
    expect(token.status).toBe(200);
    const missing = await get(`/api/v1/runs/${s.lineRun}/chart?variable=salinity`, s.cookie);
    expect(missing.status).toBe(404);
    expect(missing.body.error.message).toContain('u');
  });

  it('refuses the signed-out and hides other workspaces', () => expectGuarded((id) => `/api/v1/runs/${id}/chart`));
});

describe('GET /api/v1/runs/:id/growth', () => {
  it('gives the 2D growth grid, whose sum is the TV change of the step', async () => {
    const step = s.planeSteps[2]!;
    const res = await get(`/api/v1/runs/${s.planeRun}/growth?step=${step}`, s.cookie);
    expect(res.status).toBe(200);
    expect(res.body.shape).toEqual([12, 20]);
    expect(res.body.rows).toBe(12);
    expect(res.body.cols).toBe(20);
    expect(res.body.values).toHaveLength(240);
    expect(res.body.previousStep).toBe(s.planeSteps[1]);
    const chart = await get(`/api/v1/runs/${s.planeRun}/chart`, s.cookie);
    const change = chart.body.columns.tvChange[2];
    expect(Math.abs(res.body.total - change)).toBeLessThan(1e-9 * Math.max(1, Math.abs(chart.body.columns.tv[2])));
  });

  it('downsamples to the requested number of points', async () => {
    const res = await get(`/api/v1/runs/${s.planeRun}/growth?step=${s.planeSteps[1]}&points=36`, s.cookie);
    expect(res.status).toBe(200);
    expect(res.body.rows).toBe(6);
    expect(res.body.cols).toBe(6);
    expect(res.body.complete).toBe(false);
  });

  it('answers 400 for the first step (nothing to compare with), a missing step number and a slice of a 2D field', async () => {
    const first = await get(`/api/v1/runs/${s.planeRun}/growth?step=${s.planeSteps[0]}`, s.cookie);
    expect(first.status).toBe(400);
    expect(first.body.error.message).toMatch(/first stored step/);
    expect((await get(`/api/v1/runs/${s.planeRun}/growth`, s.cookie)).status).toBe(400);
    const slice = await get(`/api/v1/runs/${s.planeRun}/growth?step=${s.planeSteps[1]}&slice=0`, s.cookie);
    expect(slice.status).toBe(400);
    expect(slice.body.error.code).toBe('invalid:slice');
  });

  it('refuses the signed-out and hides other workspaces', () =>
    expectGuarded((id) => `/api/v1/runs/${id}/growth?step=1`));
});

describe('GET /api/v1/runs/:id/steps/:step', () => {
  it('answers as before without the new parameters', async () => {
    const step = s.lineSteps[3]!;
    const res = await get(`/api/v1/runs/${s.lineRun}/steps/${step}?variable=u`, s.cookie);
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ variable: 'u', step, shape: [100], complete: true });
    expect(res.body.index).toHaveLength(100);
    expect(res.body.values).toHaveLength(100);
  });

  it('returns only the cells of a from/to window, and marks new extrema of a step that gained some', async () => {
    const res = await get(`/api/v1/runs/${s.lineRun}/steps/${s.lineSteps[5]}?from=20&to=39`, s.cookie);
    expect(res.status).toBe(200);
    expect(res.body.window).toEqual({ from: 20, to: 39 });
    expect(res.body.index[0]).toBe(20);
    expect(res.body.index.at(-1)).toBe(39);
    const series = (await get(`/api/v1/runs/${s.lineRun}/series`, s.cookie)).body.series;
    const gained = series.newExtrema.findIndex((k: number) => k > 0);
    expect(gained).toBeGreaterThan(0);
    const marked = await get(`/api/v1/runs/${s.lineRun}/steps/${series.index[gained]}`, s.cookie);
    expect(marked.body.newExtrema.length).toBeGreaterThan(0);
    expect(marked.body.newExtrema.every((c: number) => c >= 0 && c < 100)).toBe(true);
  });

  it('answers 400 for a slice of a 1D variable and for a window with from after to', async () => {
    expect((await get(`/api/v1/runs/${s.lineRun}/steps/${s.lineSteps[1]}?slice=1`, s.cookie)).status).toBe(400);
    const backwards = await get(`/api/v1/runs/${s.lineRun}/steps/${s.lineSteps[1]}?from=50&to=10`, s.cookie);
    expect(backwards.status).toBe(400);
    expect(backwards.body.error.code).toBe('invalid:window');
  });

  it('gives a 2D step as a grid', async () => {
    const res = await get(`/api/v1/runs/${s.planeRun}/steps/${s.planeSteps[1]}`, s.cookie);
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ rows: 12, cols: 20, complete: true });
    expect(res.body.slice).toBeUndefined();
  });

  it('refuses the signed-out and hides other workspaces', () => expectGuarded((id) => `/api/v1/runs/${id}/steps/0`));
});

describe('GET /api/v1/runs/:id/file', () => {
  it('redirects a member to a short-lived storage URL that serves the uploaded bytes', async () => {
    const res = await get(`/api/v1/runs/${s.lineRun}/file`, s.cookie);
    expect(res.status).toBe(302);
    const location = res.headers.location as string;
    expect(location).toMatch(/X-Amz-Signature=/);
    const file = await fetch(location);
    expect(file.status).toBe(200);
    expect(Buffer.from(await file.arrayBuffer()).equals(fs.readFileSync(laxWendroff))).toBe(true);
  });

  it('refuses the signed-out and hides other workspaces', () => expectGuarded((id) => `/api/v1/runs/${id}/file`));
});

describe('GET /api/v1/runs/:id/metrics', () => {
  it('downloads every step as CSV, one row per step', async () => {
    const res = await get(`/api/v1/runs/${s.lineRun}/metrics?format=csv`, s.cookie);
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toMatch(/^text\/csv/);
    expect(res.headers['content-disposition']).toMatch(/^attachment; filename=".+\.csv"$/);
    const lines = res.text.trimEnd().split('\r\n');
    expect(lines[0]).toMatch(/^variable,step,time,tv,/);
    expect(lines).toHaveLength(s.lineSteps.length + 1);
    expect(lines[1]!.startsWith(`u,${s.lineSteps[0]},`)).toBe(true);
  });

  it('downloads one variable as JSON with the full series', async () => {
    const res = await get(`/api/v1/runs/${s.lineRun}/metrics?format=json&variable=u`, s.cookie);
    expect(res.status).toBe(200);
    const body = JSON.parse(res.text);
    expect(body.variables).toHaveLength(1);
    expect(body.variables[0].series.step).toEqual(s.lineSteps);
    expect(body.variables[0].series.tv).toHaveLength(s.lineSteps.length);
  });

  it('answers 400 for an unknown format', async () => {
    expect((await get(`/api/v1/runs/${s.lineRun}/metrics?format=xlsx`, s.cookie)).status).toBe(400);
  });

  it('refuses the signed-out and hides other workspaces', () => expectGuarded((id) => `/api/v1/runs/${id}/metrics`));
});
