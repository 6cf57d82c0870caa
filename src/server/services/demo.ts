import 'server-only';
import { createHash, randomBytes } from 'node:crypto';
import { appendFile, mkdtemp, rm, writeFile } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { and, count, eq, inArray } from 'drizzle-orm';
import { getDb } from '@/db/client';
import { builds, jobs, projects, runs } from '@/db/schema';
import {
  runAdvection1d,
  runAdvection2dSplit,
  sineWave,
  topHat,
  type LimiterName,
  type SchemeName,
} from '@/src/analysis/schemes';
import { cellCentres, formatLongCsv } from '@/src/lib/snapshot-csv';
import type { TokenCaller } from '../auth/caller';
import { jobHandlers } from '../jobs';
import { ANALYSE_RUN_JOB } from '../jobs/names';
import { hashPassword } from '../auth/password';
import type { Role } from '../auth/roles';
import { ensureProject, ensureWorkspace } from '../queries/projects';
import { ensureSubscription } from '../queries/subscriptions';
import { getUserByEmail, insertUser, upsertMembership } from '../queries/users';
import { runUntilIdle } from '../queue';
import { acceptBaseline } from './baselines';
import { createRunFromFile } from './runs';
import { issueToken } from './tokens';

/**
 * The demo workspace `npm start` shows: an invented modelling group with two solver projects.
 * Every file goes through the same path as a CI upload (object storage, run, queued analysis),
 * and the analysis runs through the worker's job handler.
 *
 * The story: the tracer model's nightly builds pass until build 13, where a change to the
 * advection scheme makes two cases oscillate (one now behaves like Lax-Wendroff, one like
 * Warming-Beam); build 22 fixes the first, the second still fails.
 */

export const DEMO_WORKSPACE = { slug: 'brackwater', name: 'Brackwater Modelling Group' };
const NIGHTS = 30;
const BREAK_AT = 12; // zero-based: build 13
const FIX_AT = 21; // zero-based: build 22

interface SchemeAtNight {
  scheme: SchemeName;
  limiter?: LimiterName;
}

interface DemoCase {
  name: string;
  variable: string;
  profile: 'tophat' | 'sine' | 'square2d';
  courant: number;
  scheme: (night: number) => SchemeAtNight;
  bounds?: { lower: number; upper: number };
}

const limited = (limiter: LimiterName) => (): SchemeAtNight => ({ scheme: 'limited', limiter });

const tracerCases: DemoCase[] = [
  {
    name: 'estuary-salt-front',
    variable: 'c',
    profile: 'tophat',
    courant: 0.4,
    bounds: { lower: 0, upper: 1 },
    scheme: (n) =>
      n >= BREAK_AT && n < FIX_AT ? { scheme: 'lax-wendroff' } : { scheme: 'limited', limiter: 'van-leer' },
  },
  {
    name: 'outfall-plume',
    variable: 'c',
    profile: 'tophat',
    courant: 0.3,
    bounds: { lower: 0, upper: 1 },
    scheme: (n) => (n >= BREAK_AT ? { scheme: 'warming-beam' } : { scheme: 'limited', limiter: 'minmod' }),
  },
  {
    name: 'river-mouth-pulse',
    variable: 'c',
    profile: 'tophat',
    courant: 0.5,
    bounds: { lower: 0, upper: 1 },
    scheme: limited('superbee'),
  },
  {
    name: 'tidal-flat-sediment',
    variable: 'c',
    profile: 'tophat',
    courant: 0.6,
    bounds: { lower: 0, upper: 1 },
    scheme: limited('koren'),
  },
  {
    name: 'channel-dye-release',
    variable: 'c',
    profile: 'tophat',
    courant: 0.8,
    scheme: limited('monotonized-central'),
  },
  { name: 'smooth-tide-upwind', variable: 'c', profile: 'sine', courant: 0.5, scheme: () => ({ scheme: 'upwind' }) },
  {
    name: 'lagoon-patch-2d',
    variable: 'c',
    profile: 'square2d',
    courant: 0.4,
    bounds: { lower: 0, upper: 1 },
    scheme: limited('minmod'),
  },
];

const flowCases: DemoCase[] = [
  { name: 'contact-wave', variable: 'rho', profile: 'tophat', courant: 0.45, scheme: limited('van-albada') },
  { name: 'density-step', variable: 'rho', profile: 'tophat', courant: 0.7, scheme: limited('van-leer') },
  { name: 'entropy-wave', variable: 'rho', profile: 'sine', courant: 0.5, scheme: () => ({ scheme: 'upwind' }) },
  { name: 'pressure-pulse', variable: 'rho', profile: 'tophat', courant: 0.9, scheme: limited('minmod') },
  { name: 'shear-layer-2d', variable: 'rho', profile: 'square2d', courant: 0.3, scheme: limited('van-leer') },
];

const CELLS = 100;
const SIDE_2D = 24;
const TIME_STEPS = 40;
const EVERY = 4;

/** Snapshots of one case on one night, as the CSV a solver's post-processing would write. */
function caseCsv(c: DemoCase, night: number): string {
  const choice = c.scheme(night);
  const times = Array.from({ length: TIME_STEPS / EVERY + 1 }, (_, k) =>
    Number((k * EVERY * c.courant * (1 / CELLS)).toPrecision(12)),
  );
  const steps = times.map((_, k) => k * EVERY);
  // Flow cases carry density around 1, not 0, as a gas would.
  const offset = c.variable === 'rho' ? 1 : 0;
  if (c.profile === 'square2d') {
    const initial = new Float64Array(SIDE_2D * SIDE_2D);
    for (let y = 6; y < 14; y++) for (let x = 5; x < 13; x++) initial[y * SIDE_2D + x] = 1;
    if (offset) for (let i = 0; i < initial.length; i++) initial[i]! += offset;
    const snaps = runAdvection2dSplit({
      initial,
      nx: SIDE_2D,
      ny: SIDE_2D,
      courantX: c.courant,
      courantY: c.courant / 2,
      steps: TIME_STEPS,
      every: EVERY,
      ...choice,
    });
    const centres = cellCentres(SIDE_2D);
    return formatLongCsv({
      steps,
      times,
      axes: [
        { name: 'y', centres },
        { name: 'x', centres },
      ],
      variables: { [c.variable]: snaps },
      digits: 17,
    });
  }
  const initial = c.profile === 'sine' ? sineWave(CELLS) : topHat(CELLS, 20, 20, offset, offset + 1);
  if (c.profile === 'sine' && offset) for (let i = 0; i < initial.length; i++) initial[i] = offset + 0.2 * initial[i]!;
  const snaps = runAdvection1d({ initial, courant: c.courant, steps: TIME_STEPS, every: EVERY, ...choice });
  return formatLongCsv({
    steps,
    times,
    axes: [{ name: 'x', centres: cellCentres(CELLS) }],
    variables: { [c.variable]: snaps },
    digits: 17,
  });
}

function demoCommit(project: string, night: number): string {
  return createHash('sha1').update(`${project}:${night}`).digest('hex').slice(0, 12);
}

function nightDate(night: number, nights: number): Date {
  const d = new Date();
  d.setUTCHours(2, 10, 0, 0);
  d.setUTCDate(d.getUTCDate() - (nights - night));
  return d;
}

async function postCase(
  caller: TokenCaller,
  dir: string,
  c: DemoCase,
  night: number,
  buildKey: string,
  commit: string,
): Promise<string> {
  const text = caseCsv(c, night);
  const file = path.join(dir, `${c.name}-${night}.csv`);
  await writeFile(file, text);
  // The reference schemes run on periodic domains: say so, or the wrap-around looks like a jump.
  const periodic: Record<string, boolean> = c.profile === 'square2d' ? { x: true, y: true } : { x: true };
  const options = { periodic, velocitySign: 1 as const, ...(c.bounds ? { bounds: c.bounds } : {}) };
  const manifest = { variableOptions: { [c.variable]: options } };
  const { run } = await createRunFromFile({
    scope: caller,
    target: {
      build: buildKey,
      commit,
      branch: 'main',
      case: c.name,
      ciUrl: `https://ci.brackwater.example/builds/${buildKey}`,
      manifest,
    },
    file: {
      path: file,
      fileName: `${c.name}.csv`,
      contentType: 'text/csv',
      size: Buffer.byteLength(text),
      sha256: createHash('sha256').update(text).digest('hex'),
    },
    idempotencyKey: `demo:${buildKey}:${c.name}`,
  });
  await rm(file, { force: true });
  return run.id;
}

/** Moves a seeded build and its runs back to the night it pretends to have run. */
async function backdateBuild(projectId: string, key: string, at: Date): Promise<void> {
  const db = getDb();
  const [build] = await db
    .update(builds)
    .set({ startedAt: at })
    .where(and(eq(builds.projectId, projectId), eq(builds.key, key)))
    .returning({ id: builds.id });
  if (build) await db.update(runs).set({ queuedAt: at, createdAt: at }).where(eq(runs.buildId, build.id));
}

async function analyseQueued(): Promise<void> {
  await runUntilIdle({ handlers: { [ANALYSE_RUN_JOB]: jobHandlers[ANALYSE_RUN_JOB]! } });
}

interface DemoProject {
  slug: string;
  name: string;
  cases: DemoCase[];
  /** Nights on which the project builds (every night, or every third). */
  nights: number[];
}

/** One demo account per role, with a fresh random password each time the demo is seeded. */
async function seedDemoAccounts(workspaceId: string): Promise<string[]> {
  const lines: string[] = [];
  const people: { role: Role; name: string; email: string }[] = [
    { role: 'admin', name: 'Ines Marlowe', email: 'admin@brackwater.example' },
    { role: 'maintainer', name: 'Tomas Reeve', email: 'maintainer@brackwater.example' },
    { role: 'viewer', name: 'Odile Fenwick', email: 'viewer@brackwater.example' },
  ];
  for (const p of people) {
    if (await getUserByEmail({ email: p.email })) continue;
    const password = randomBytes(12).toString('base64url');
    const user = await insertUser({
      email: p.email,
      name: p.name,
      passwordHash: await hashPassword(password),
      emailVerified: true,
    });
    await upsertMembership({ workspaceId, userId: user.id, role: p.role });
    lines.push(`Demo sign-in (${p.role}): ${p.email} / ${password}`);
  }
  return lines;
}

/**
 * The lead reads the weekly digest (Monday 08:00 in the team's time zone); the
 * maintainer also wants an alert as soon as a case starts failing.
 */
async function subscribeDemoPeople(workspaceId: string, projectId: string): Promise<void> {
  const wanted = [
    { email: 'admin@brackwater.example', failureAlerts: false },
    { email: 'maintainer@brackwater.example', failureAlerts: true },
  ];
  for (const w of wanted) {
    const user = await getUserByEmail({ email: w.email });
    if (!user) continue;
    await ensureSubscription({
      workspaceId,
      projectId,
      userId: user.id,
      email: user.email,
      settings: {
        weeklyDigest: true,
        failureAlerts: w.failureAlerts,
        digestDay: 1,
        digestHour: 8,
        timeZone: 'Europe/Lisbon',
      },
    });
  }
}

/** Secrets made for the demo are appended to the notes file, which `npm start` prints. */
async function keepNotes(file: string | undefined, lines: string[]): Promise<void> {
  if (file && lines.length > 0) await appendFile(file, `${lines.join('\n')}\n`, { mode: 0o600 });
}

export async function seedDemo(options: { notesFile?: string } = {}): Promise<string> {
  const ws = await ensureWorkspace(DEMO_WORKSPACE);
  await keepNotes(options.notesFile, await seedDemoAccounts(ws.id));
  const [existing] = await getDb()
    .select({ n: count() })
    .from(builds)
    .innerJoin(projects, eq(projects.id, builds.projectId))
    .where(eq(projects.workspaceId, ws.id));
  if ((existing?.n ?? 0) > 0) return 'demo data already present';

  const demoProjects: DemoProject[] = [
    {
      slug: 'tidewater',
      name: 'Tidewater coastal tracer model',
      cases: tracerCases,
      nights: Array.from({ length: NIGHTS }, (_, n) => n),
    },
    {
      slug: 'kestrel-flow',
      name: 'Kestrel compressible-flow code',
      cases: flowCases,
      nights: Array.from({ length: NIGHTS / 3 }, (_, k) => k * 3),
    },
  ];
  const dir = await mkdtemp(path.join(os.tmpdir(), 'varigate-demo-'));
  const notes: string[] = [];
  try {
    for (const p of demoProjects) {
      const project = await ensureProject({ workspaceId: ws.id, slug: p.slug, name: p.name });
      await subscribeDemoPeople(ws.id, project.id);
      const token = await issueToken({ workspaceId: ws.id, projectId: project.id, name: 'demo CI' });
      notes.push(`CI token for project ${p.slug}: ${token.token}`);
      const caller: TokenCaller = {
        kind: 'token',
        tokenId: token.id,
        workspaceId: ws.id,
        projectId: project.id,
        projectSlug: p.slug,
      };
      for (const [i, night] of p.nights.entries()) {
        const key = `nightly-${1001 + night}`;
        const commit = demoCommit(p.slug, night);
        const runIds: Record<string, string> = {};
        for (const c of p.cases) runIds[c.name] = await postCase(caller, dir, c, night, key, commit);
        await backdateBuild(project.id, key, nightDate(night, NIGHTS));
        if (i === 0) {
          // The first night's results become the accepted baselines.
          await analyseQueued();
          for (const c of p.cases) {
            await acceptBaseline({
              actor: { workspaceId: ws.id },
              projectId: project.id,
              caseName: c.name,
              runId: runIds[c.name]!,
            });
          }
        }
      }
    }
    await analyseQueued();
  } finally {
    await rm(dir, { recursive: true, force: true });
  }
  await keepNotes(options.notesFile, notes);
  const [total] = await getDb().select({ n: count() }).from(runs).where(eq(runs.workspaceId, ws.id));
  const [left] = await getDb()
    .select({ n: count() })
    .from(jobs)
    .where(and(eq(jobs.kind, ANALYSE_RUN_JOB), inArray(jobs.status, ['queued', 'running'])));
  return `seeded workspace ${DEMO_WORKSPACE.slug}: ${total?.n ?? 0} runs${left?.n ? `, ${left.n} still queued` : ''}`;
}
