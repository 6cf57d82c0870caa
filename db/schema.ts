/**
 * Varigate's tables. Words follow PRODUCT.md: workspace > project > case; build > run > variable
 * > finding; baseline = the accepted run of a case on a branch. Every row below a workspace keeps
 * its `workspace_id` so that queries can scope by it without joins, which is what makes
 * cross-workspace isolation the default (see src/server/queries).
 */
import { sql } from 'drizzle-orm';
import {
  bigint,
  bigserial,
  boolean,
  doublePrecision,
  index,
  integer,
  jsonb,
  pgEnum,
  pgTable,
  primaryKey,
  text,
  timestamp,
  uniqueIndex,
  uuid,
} from 'drizzle-orm/pg-core';

const createdAt = () => timestamp('created_at', { withTimezone: true }).notNull().defaultNow();

export const roleEnum = pgEnum('role', ['admin', 'maintainer', 'viewer']);
export const runStatusEnum = pgEnum('run_status', ['queued', 'analysing', 'done', 'error']);
export const verdictEnum = pgEnum('verdict', ['pass', 'warn', 'fail', 'error']);
export const severityEnum = pgEnum('severity', ['warn', 'fail']);
export const jobStatusEnum = pgEnum('job_status', ['queued', 'running', 'done', 'dead']);

/** The owning workspace (or project, or run): rows go when their owner goes. */
const workspaceRef = () =>
  uuid('workspace_id')
    .notNull()
    .references(() => workspaces.id, { onDelete: 'cascade' });
const projectRef = () =>
  uuid('project_id')
    .notNull()
    .references(() => projects.id, { onDelete: 'cascade' });
const runRef = () =>
  uuid('run_id')
    .notNull()
    .references(() => runs.id, { onDelete: 'cascade' });

export const workspaces = pgTable('workspaces', {
  id: uuid('id').primaryKey().defaultRandom(),
  slug: text('slug').notNull().unique(),
  name: text('name').notNull(),
  createdAt: createdAt(),
});
export type Workspace = typeof workspaces.$inferSelect;

export const users = pgTable('users', {
  id: uuid('id').primaryKey().defaultRandom(),
  /** Stored lower-cased; unique. */
  email: text('email').notNull().unique(),
  name: text('name'),
  passwordHash: text('password_hash'),
  /** Sessions issued before this moment are void (set when the password is reset). */
  sessionsValidAfter: timestamp('sessions_valid_after', { withTimezone: true }),
  emailVerifiedAt: timestamp('email_verified_at', { withTimezone: true }),
  createdAt: createdAt(),
});
export type User = typeof users.$inferSelect;

export const memberships = pgTable(
  'memberships',
  {
    workspaceId: workspaceRef(),
    userId: uuid('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    role: roleEnum('role').notNull(),
    createdAt: createdAt(),
  },
  (t) => [primaryKey({ columns: [t.workspaceId, t.userId] }), index('memberships_user_idx').on(t.userId)],
);
export type Membership = typeof memberships.$inferSelect;

export const projects = pgTable(
  'projects',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    workspaceId: workspaceRef(),
    slug: text('slug').notNull(),
    name: text('name').notNull(),
    defaultBranch: text('default_branch').notNull().default('main'),
    /** Partial policy (src/analysis/policy) applied to every case of the project. */
    defaultPolicy: jsonb('default_policy').notNull().default({}),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex('projects_workspace_slug_idx').on(t.workspaceId, t.slug)],
);
export type Project = typeof projects.$inferSelect;

export const cases = pgTable(
  'cases',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    workspaceId: workspaceRef(),
    projectId: projectRef(),
    name: text('name').notNull(),
    /** Partial policy overriding the project's default for this case. */
    policy: jsonb('policy').notNull().default({}),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex('cases_project_name_idx').on(t.projectId, t.name)],
);
export type Case = typeof cases.$inferSelect;

export const builds = pgTable(
  'builds',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    workspaceId: workspaceRef(),
    projectId: projectRef(),
    /** The CI's own build id; unique within a project. */
    key: text('key').notNull(),
    commit: text('commit').notNull(),
    branch: text('branch').notNull(),
    ciUrl: text('ci_url'),
    /** Worst verdict of its finished runs; null while nothing has finished. */
    verdict: verdictEnum('verdict'),
    startedAt: timestamp('started_at', { withTimezone: true }).notNull().defaultNow(),
    finishedAt: timestamp('finished_at', { withTimezone: true }),
    createdAt: createdAt(),
  },
  (t) => [
    uniqueIndex('builds_project_key_idx').on(t.projectId, t.key),
    index('builds_workspace_started_idx').on(t.workspaceId, t.startedAt),
    index('builds_workspace_verdict_started_idx').on(t.workspaceId, t.verdict, t.startedAt),
    index('builds_project_branch_started_idx').on(t.projectId, t.branch, t.startedAt),
  ],
);
export type Build = typeof builds.$inferSelect;

export const runs = pgTable(
  'runs',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    workspaceId: workspaceRef(),
    projectId: projectRef(),
    buildId: uuid('build_id')
      .notNull()
      .references(() => builds.id, { onDelete: 'cascade' }),
    caseId: uuid('case_id')
      .notNull()
      .references(() => cases.id, { onDelete: 'cascade' }),
    status: runStatusEnum('status').notNull().default('queued'),
    verdict: verdictEnum('verdict'),
    errorMessage: text('error_message'),
    /** Manifest sent with the upload (per-variable options, column names). */
    manifest: jsonb('manifest').notNull().default({}),
    /** Effective policy the verdict was judged with (defaults + project + case). */
    policy: jsonb('policy'),
    idempotencyKey: text('idempotency_key'),
    /** SHA-256 of the request that created the run, to refuse a reused key with another body. */
    requestHash: text('request_hash'),
    queuedAt: timestamp('queued_at', { withTimezone: true }).notNull().defaultNow(),
    startedAt: timestamp('started_at', { withTimezone: true }),
    finishedAt: timestamp('finished_at', { withTimezone: true }),
    createdAt: createdAt(),
  },
  (t) => [
    uniqueIndex('runs_project_idempotency_idx')
      .on(t.projectId, t.idempotencyKey)
      .where(sql`${t.idempotencyKey} is not null`),
    index('runs_build_idx').on(t.buildId),
    index('runs_case_created_idx').on(t.caseId, t.createdAt),
    index('runs_workspace_created_idx').on(t.workspaceId, t.createdAt),
  ],
);
export type Run = typeof runs.$inferSelect;

export const uploads = pgTable(
  'uploads',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    workspaceId: workspaceRef(),
    runId: runRef(),
    objectKey: text('object_key').notNull(),
    fileName: text('file_name').notNull(),
    size: bigint('size', { mode: 'number' }).notNull(),
    sha256: text('sha256').notNull(),
    format: text('format'),
    contentType: text('content_type'),
    createdAt: createdAt(),
  },
  (t) => [index('uploads_run_idx').on(t.runId)],
);
export type Upload = typeof uploads.$inferSelect;

/**
 * One analysed field of a run. `series` holds the per-step metrics as parallel arrays (one
 * array per metric, one entry per step), so a 5,000-step run is one row, not 5,000.
 */
export const variables = pgTable(
  'variables',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    workspaceId: workspaceRef(),
    runId: runRef(),
    name: text('name').notNull(),
    shape: integer('shape').array().notNull(),
    precision: text('precision').notNull(),
    summary: jsonb('summary').notNull(),
    series: jsonb('series').notNull(),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex('variables_run_name_idx').on(t.runId, t.name)],
);
export type Variable = typeof variables.$inferSelect;

export const findings = pgTable(
  'findings',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    workspaceId: workspaceRef(),
    runId: runRef(),
    variable: text('variable').notNull(),
    kind: text('kind').notNull(),
    severity: severityEnum('severity').notNull(),
    step: integer('step'),
    time: doublePrecision('time'),
    location: jsonb('location'),
    magnitude: doublePrecision('magnitude'),
    threshold: doublePrecision('threshold'),
    /** The rest of the analysis finding: relative size, steps affected, worst step, baseline value. */
    details: jsonb('details').notNull().default({}),
    message: text('message').notNull(),
    createdAt: createdAt(),
  },
  (t) => [index('findings_run_idx').on(t.runId)],
);
export type Finding = typeof findings.$inferSelect;

export const baselines = pgTable(
  'baselines',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    workspaceId: workspaceRef(),
    caseId: uuid('case_id')
      .notNull()
      .references(() => cases.id, { onDelete: 'cascade' }),
    branch: text('branch').notNull(),
    runId: runRef(),
    acceptedBy: uuid('accepted_by').references(() => users.id, { onDelete: 'set null' }),
    acceptedByToken: uuid('accepted_by_token'),
    acceptedAt: timestamp('accepted_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [uniqueIndex('baselines_case_branch_idx').on(t.caseId, t.branch)],
);
export type Baseline = typeof baselines.$inferSelect;

export const tokens = pgTable(
  'tokens',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    workspaceId: workspaceRef(),
    projectId: projectRef(),
    name: text('name').notNull(),
    /** The first characters of the secret, shown in lists so people can tell tokens apart. */
    prefix: text('prefix').notNull(),
    secretHash: text('secret_hash').notNull().unique(),
    createdBy: uuid('created_by').references(() => users.id, { onDelete: 'set null' }),
    createdAt: createdAt(),
    lastUsedAt: timestamp('last_used_at', { withTimezone: true }),
    revokedAt: timestamp('revoked_at', { withTimezone: true }),
  },
  (t) => [index('tokens_project_idx').on(t.projectId)],
);
export type Token = typeof tokens.$inferSelect;

export const subscriptions = pgTable(
  'subscriptions',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    workspaceId: workspaceRef(),
    projectId: projectRef(),
    /** Null for a mailing-list address subscribed by a maintainer. */
    userId: uuid('user_id').references(() => users.id, { onDelete: 'cascade' }),
    email: text('email').notNull(),
    weeklyDigest: boolean('weekly_digest').notNull().default(true),
    failureAlerts: boolean('failure_alerts').notNull().default(false),
    /** 0 = Sunday ... 6 = Saturday, in `timeZone`. */
    digestDay: integer('digest_day').notNull().default(1),
    digestHour: integer('digest_hour').notNull().default(8),
    timeZone: text('time_zone').notNull().default('UTC'),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex('subscriptions_project_email_idx').on(t.projectId, t.email)],
);
export type Subscription = typeof subscriptions.$inferSelect;

export const auditEvents = pgTable(
  'audit_events',
  {
    id: bigserial('id', { mode: 'number' }).primaryKey(),
    workspaceId: workspaceRef(),
    actorUserId: uuid('actor_user_id'),
    actorTokenId: uuid('actor_token_id'),
    action: text('action').notNull(),
    targetType: text('target_type').notNull(),
    targetId: text('target_id'),
    details: jsonb('details').notNull().default({}),
    createdAt: createdAt(),
  },
  (t) => [index('audit_events_workspace_created_idx').on(t.workspaceId, t.createdAt)],
);
export type AuditEvent = typeof auditEvents.$inferSelect;

/**
 * The job queue (src/server/queue). A worker claims a job with FOR UPDATE SKIP LOCKED and holds
 * a lease it renews while working; a job whose lease ran out (its worker died) is claimed again.
 * `dedupe_key` makes enqueueing idempotent (one analysis per run, one digest per period).
 */
export const jobs = pgTable(
  'jobs',
  {
    id: bigserial('id', { mode: 'number' }).primaryKey(),
    kind: text('kind').notNull(),
    payload: jsonb('payload').notNull().default({}),
    status: jobStatusEnum('status').notNull().default('queued'),
    dedupeKey: text('dedupe_key').unique(),
    runAt: timestamp('run_at', { withTimezone: true }).notNull().defaultNow(),
    attempts: integer('attempts').notNull().default(0),
    maxAttempts: integer('max_attempts').notNull().default(5),
    lockedBy: text('locked_by'),
    lockedUntil: timestamp('locked_until', { withTimezone: true }),
    lastError: text('last_error'),
    createdAt: createdAt(),
    finishedAt: timestamp('finished_at', { withTimezone: true }),
  },
  (t) => [index('jobs_claim_idx').on(t.status, t.runAt)],
);
export type Job = typeof jobs.$inferSelect;

/**
 * One-time links sent by mail: sign-in without a password, and password reset. Only the
 * SHA-256 of the secret is stored; a link works once and until `expires_at`.
 */
export const signInTokens = pgTable(
  'sign_in_tokens',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    email: text('email').notNull(),
    userId: uuid('user_id').references(() => users.id, { onDelete: 'cascade' }),
    purpose: text('purpose', { enum: ['sign-in', 'reset'] }).notNull(),
    tokenHash: text('token_hash').notNull().unique(),
    expiresAt: timestamp('expires_at', { withTimezone: true }).notNull(),
    usedAt: timestamp('used_at', { withTimezone: true }),
    createdAt: createdAt(),
  },
  (t) => [index('sign_in_tokens_email_idx').on(t.email, t.createdAt)],
);
export type SignInToken = typeof signInTokens.$inferSelect;

/** An admin's invitation to a workspace with a role; the link works once, for 7 days. */
export const invitations = pgTable(
  'invitations',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    workspaceId: workspaceRef(),
    email: text('email').notNull(),
    role: roleEnum('role').notNull(),
    tokenHash: text('token_hash').notNull().unique(),
    invitedBy: uuid('invited_by').references(() => users.id, { onDelete: 'set null' }),
    expiresAt: timestamp('expires_at', { withTimezone: true }).notNull(),
    acceptedAt: timestamp('accepted_at', { withTimezone: true }),
    revokedAt: timestamp('revoked_at', { withTimezone: true }),
    createdAt: createdAt(),
  },
  (t) => [index('invitations_workspace_idx').on(t.workspaceId, t.createdAt)],
);
export type Invitation = typeof invitations.$inferSelect;

/**
 * Sign-in attempts, for rate limiting per account and per client address. In the database, not
 * in memory, so the limit holds across web instances.
 */
export const signInAttempts = pgTable(
  'sign_in_attempts',
  {
    id: bigserial('id', { mode: 'number' }).primaryKey(),
    email: text('email').notNull(),
    ip: text('ip').notNull(),
    succeeded: boolean('succeeded').notNull(),
    createdAt: createdAt(),
  },
  (t) => [
    index('sign_in_attempts_email_idx').on(t.email, t.createdAt),
    index('sign_in_attempts_ip_idx').on(t.ip, t.createdAt),
  ],
);

/**
 * Every mail the app sends (digests, alerts, invitations, sign-in links): queued, sent, or
 * failed with the SMTP error. `dedupe_key` makes a send idempotent: one digest per subscriber
 * and period, one alert per subscriber and failing streak, whatever the number of workers.
 */
export const mailDeliveries = pgTable(
  'mail_deliveries',
  {
    id: bigserial('id', { mode: 'number' }).primaryKey(),
    workspaceId: uuid('workspace_id').references(() => workspaces.id, { onDelete: 'cascade' }),
    kind: text('kind', { enum: ['digest', 'alert', 'invitation', 'sign-in', 'reset', 'preview'] }).notNull(),
    recipient: text('recipient').notNull(),
    subject: text('subject').notNull(),
    dedupeKey: text('dedupe_key').unique(),
    status: text('status', { enum: ['queued', 'sent', 'failed'] })
      .notNull()
      .default('queued'),
    attempts: integer('attempts').notNull().default(0),
    lastError: text('last_error'),
    messageId: text('message_id'),
    payload: jsonb('payload').notNull().default({}),
    createdAt: createdAt(),
    sentAt: timestamp('sent_at', { withTimezone: true }),
  },
  (t) => [index('mail_deliveries_workspace_created_idx').on(t.workspaceId, t.createdAt)],
);
export type MailDelivery = typeof mailDeliveries.$inferSelect;

/** People's notes on a run ("flux limiter change in 9c1e2f0; expected", "reran with dt/2"). */
export const runNotes = pgTable(
  'run_notes',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    workspaceId: workspaceRef(),
    runId: runRef(),
    authorId: uuid('author_id').references(() => users.id, { onDelete: 'set null' }),
    body: text('body').notNull(),
    createdAt: createdAt(),
  },
  (t) => [index('run_notes_run_idx').on(t.runId, t.createdAt)],
);
export type RunNote = typeof runNotes.$inferSelect;
