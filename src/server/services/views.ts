import 'server-only';
import { notFound } from 'next/navigation';
import { fillDays, trailingPassRate } from '@/src/lib/pass-rate';
import type { OverviewQuery } from '@/src/schemas/overview';
import type { MemberContext } from '../auth/session';
import { getBuildByKey } from '../queries/builds';
import { getPreviousBuild, listBuildCases, type BuildCaseRow } from '../queries/build-view';
import { getWorkspaceCounts, listBranches, listOverviewBuilds } from '../queries/overview';
import { getProjectBySlug, listProjects } from '../queries/projects';
import { listCaseStates, listDailyPassRates, listProjectBuilds } from '../queries/project-view';

/**
 * What the overview, project and build pages show. Each takes the member context that the page
 * got from requireMember, so every query is scoped by the workspace in the URL.
 */

export const OVERVIEW_PAGE_SIZE = 25;

export async function getOverview(ctx: MemberContext, query: OverviewQuery) {
  const [builds, projects, branches, counts] = await Promise.all([
    listOverviewBuilds({ workspaceId: ctx.workspace.id, ...query, pageSize: OVERVIEW_PAGE_SIZE }),
    listProjects({ workspaceId: ctx.workspace.id }),
    listBranches({ workspaceId: ctx.workspace.id }),
    getWorkspaceCounts({ workspaceId: ctx.workspace.id }),
  ]);
  return {
    ...builds,
    pageSize: OVERVIEW_PAGE_SIZE,
    projects: projects.map((p) => ({ slug: p.slug, name: p.name })),
    branches,
    counts,
  };
}

async function requireProject(ctx: MemberContext, slug: string) {
  const project = await getProjectBySlug({ workspaceId: ctx.workspace.id, slug });
  if (!project) notFound();
  return project;
}

export const TREND_DAYS = 60;
export const TREND_WINDOW = 7;

export async function getProjectView(ctx: MemberContext, slug: string, page: number) {
  const project = await requireProject(ctx, slug);
  const pageSize = 20;
  const [daily, builds, cases] = await Promise.all([
    listDailyPassRates({
      workspaceId: ctx.workspace.id,
      projectId: project.id,
      branch: project.defaultBranch,
      days: TREND_DAYS,
    }),
    listProjectBuilds({
      workspaceId: ctx.workspace.id,
      projectId: project.id,
      limit: pageSize + 1,
      offset: (page - 1) * pageSize,
    }),
    listCaseStates({ workspaceId: ctx.workspace.id, projectId: project.id, branch: project.defaultBranch }),
  ]);
  const last = new Date().toISOString().slice(0, 10);
  const first = new Date(Date.now() - (TREND_DAYS - 1) * 86_400_000).toISOString().slice(0, 10);
  const trend = trailingPassRate(fillDays(daily, first, last), TREND_WINDOW);
  return { project, trend, builds: builds.slice(0, pageSize), hasMore: builds.length > pageSize, page, cases };
}

export interface CaseChange {
  caseName: string;
  before: string | null;
  after: string | null;
}

/** Cases whose verdict differs between two builds (added or dropped cases count as changes). */
export function compareBuildCases(current: BuildCaseRow[], previous: BuildCaseRow[]): CaseChange[] {
  const before = new Map(previous.map((c) => [c.caseName, c.verdict]));
  const after = new Map(current.map((c) => [c.caseName, c.verdict]));
  const names = [...new Set([...before.keys(), ...after.keys()])].sort();
  return names
    .map((caseName) => ({ caseName, before: before.get(caseName) ?? null, after: after.get(caseName) ?? null }))
    .filter((c) => c.before !== c.after);
}

export async function getBuildView(ctx: MemberContext, projectSlug: string, key: string) {
  const project = await requireProject(ctx, projectSlug);
  const build = await getBuildByKey({ workspaceId: ctx.workspace.id, projectId: project.id, key });
  if (!build) notFound();
  const [cases, previous] = await Promise.all([
    listBuildCases({ workspaceId: ctx.workspace.id, buildId: build.id }),
    getPreviousBuild({
      workspaceId: ctx.workspace.id,
      projectId: project.id,
      branch: build.branch,
      before: build.startedAt,
    }),
  ]);
  const previousCases = previous ? await listBuildCases({ workspaceId: ctx.workspace.id, buildId: previous.id }) : [];
  return { project, build, cases, previous, changes: previous ? compareBuildCases(cases, previousCases) : [] };
}
