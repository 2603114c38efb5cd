// Lensfield's relational schema. Row types are inferred from here ($inferSelect); never write them twice.
// users/sessions follow the column names lucia's PostgreSQL adapter queries (id, user_id, expires_at).
import { sql } from 'drizzle-orm'
import { bigint, boolean, check, customType, doublePrecision, index, integer, jsonb, pgEnum, pgTable, primaryKey, text, timestamp, uniqueIndex, uuid } from 'drizzle-orm/pg-core'
import type { ProjectLimits } from '../../shared/types/project'
import type { CellSummary } from '../../shared/types/figures'
import type { Scenario } from '../../shared/types/scenario'
import type { ScenarioWithRefs } from '../../shared/types/table-refs'
import type { SweepAxis } from '../../shared/types/sweep'

export const roleEnum = pgEnum('team_role', ['lead', 'designer', 'viewer'])
export const ROLES = roleEnum.enumValues
export type Role = (typeof ROLES)[number]

export const users = pgTable('users', {
  // lucia generates text ids; the adapter selects users.* and hands every column but id to getUserAttributes.
  id: text('id').primaryKey(),
  email: text('email').notNull(),
  name: text('name').notNull(),
  passwordHash: text('password_hash').notNull(),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
}, (t) => [uniqueIndex('users_email_key').on(t.email)])

export const sessions = pgTable('sessions', {
  id: text('id').primaryKey(),
  userId: text('user_id').notNull().references(() => users.id, { onDelete: 'cascade' }),
  expiresAt: timestamp('expires_at', { withTimezone: true }).notNull(),
}, (t) => [index('sessions_user_id_idx').on(t.userId)])

export const teams = pgTable('teams', {
  id: uuid('id').primaryKey().defaultRandom(),
  // Natural key: the demo loader and future invitations address a team by its slug.
  slug: text('slug').notNull(),
  name: text('name').notNull(),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
}, (t) => [uniqueIndex('teams_slug_key').on(t.slug)])

export const memberships = pgTable('memberships', {
  teamId: uuid('team_id').notNull().references(() => teams.id, { onDelete: 'cascade' }),
  userId: text('user_id').notNull().references(() => users.id, { onDelete: 'cascade' }),
  role: roleEnum('role').notNull(),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
}, (t) => [primaryKey({ columns: [t.teamId, t.userId] }), index('memberships_user_id_idx').on(t.userId)])

export const projects = pgTable('projects', {
  id: uuid('id').primaryKey().defaultRandom(),
  teamId: uuid('team_id').notNull().references(() => teams.id, { onDelete: 'cascade' }),
  name: text('name').notNull(),
  description: text('description').notNull().default(''),
  /** Fabrication limits the lead states for the project (shared/types/project.ts projectLimitsSchema); null: none. */
  limits: jsonb('limits').$type<ProjectLimits>(),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow(),
}, (t) => [uniqueIndex('projects_team_name_key').on(t.teamId, t.name)])

export const designs = pgTable('designs', {
  id: uuid('id').primaryKey().defaultRandom(),
  projectId: uuid('project_id').notNull().references(() => projects.id, { onDelete: 'cascade' }),
  name: text('name').notNull(),
  // Starts at 1; every saved change of the scenario or name makes the next version.
  version: integer('version').notNull().default(1),
  authorId: text('author_id').references(() => users.id, { onDelete: 'set null' }),
  // Validated by shared/types/scenario.ts (scenarioSchema) before it is written.
  // a design keeps its table references ({ tableId }); runs store the scenario with them resolved
  scenario: jsonb('scenario').$type<ScenarioWithRefs>().notNull(),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow(),
}, (t) => [
  uniqueIndex('designs_project_name_key').on(t.projectId, t.name),
  check('designs_version_positive', sql`${t.version} >= 1`),
])

// ── Runs and sweeps ─────────────────────────────────────────────────────────────────────────────────────────
// A run evaluates one design (kind 'single', one cell); a sweep evaluates a grid of one or two axes over a design
// (kind 'sweep', one cell per grid point). Each cell is traced in ray batches; a batch is one queued job. Counts are
// merged into the cell under a row lock, and the batch is marked done in the same transaction, so a retried or
// duplicated job never counts twice.
/** Raw bytes (tallies of integer counts as little-endian Float64). */
export const bytea = customType<{ data: Buffer; driverData: Buffer }>({ dataType: () => 'bytea' })

export const runStatusEnum = pgEnum('run_status', ['queued', 'running', 'done', 'cancelled', 'failed'])
export const cellStatusEnum = pgEnum('cell_status', ['queued', 'running', 'done', 'infeasible', 'cancelled', 'failed'])
export const batchStatusEnum = pgEnum('batch_status', ['queued', 'done', 'cancelled', 'failed'])
export const runKindEnum = pgEnum('run_kind', ['single', 'sweep'])

export const runs = pgTable('runs', {
  id: uuid('id').primaryKey().defaultRandom(),
  projectId: uuid('project_id').notNull().references(() => projects.id, { onDelete: 'cascade' }),
  designId: uuid('design_id').references(() => designs.id, { onDelete: 'set null' }),
  designVersion: integer('design_version').notNull(),
  designName: text('design_name').notNull(),
  kind: runKindEnum('kind').notNull(),
  name: text('name').notNull(),
  /** The design's scenario as it was when the run was created (validated by scenarioSchema). */
  baseScenario: jsonb('base_scenario').$type<Scenario>().notNull(),
  /** Sweep axes (shared/types/sweep.ts SweepAxis[]); [] for a single run. */
  axes: jsonb('axes').$type<SweepAxis[]>().notNull().default(sql`'[]'::jsonb`),
  /** Figure the best cell is chosen by. */
  figure: text('figure').notNull().default('enhancement'),
  seed: bigint('seed', { mode: 'number' }).notNull(),
  /** Fixed ray count per cell, or null with a target standard error and a ray cap. */
  raysPerCell: bigint('rays_per_cell', { mode: 'number' }),
  targetStdErr: doublePrecision('target_std_err'),
  rayCap: bigint('ray_cap', { mode: 'number' }),
  batchRays: integer('batch_rays').notNull(),
  /** Rays this run holds against the team's ray limit: its whole cost (a precision run's ray cap, not its first round). */
  raysReserved: bigint('rays_reserved', { mode: 'number' }),
  /** Interface/reflector encounters one batch may spend (both streams); rays past it are counted unresolved. */
  batchEvents: bigint('batch_events', { mode: 'number' }),
  /** Cost warnings from the pilot trace at creation, shown on the run page. */
  warnings: jsonb('warnings').$type<string[]>().notNull().default(sql`'[]'::jsonb`),
  status: runStatusEnum('status').notNull().default('queued'),
  cellsTotal: integer('cells_total').notNull(),
  cellsFinished: integer('cells_finished').notNull().default(0),
  raysPlanned: bigint('rays_planned', { mode: 'number' }).notNull().default(0),
  raysDone: bigint('rays_done', { mode: 'number' }).notNull().default(0),
  bestCellIndex: integer('best_cell_index'),
  error: text('error'),
  engineVersion: text('engine_version').notNull(),
  createdBy: text('created_by').references(() => users.id, { onDelete: 'set null' }),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  startedAt: timestamp('started_at', { withTimezone: true }),
  finishedAt: timestamp('finished_at', { withTimezone: true }),
}, (t) => [index('runs_project_idx').on(t.projectId, t.createdAt)])

export const runCells = pgTable('run_cells', {
  id: uuid('id').primaryKey().defaultRandom(),
  runId: uuid('run_id').notNull().references(() => runs.id, { onDelete: 'cascade' }),
  cellIndex: integer('cell_index').notNull(),
  /** Axis values of this grid point, in axis order ([] for a single run). */
  coordinates: jsonb('coordinates').$type<number[]>().notNull(),
  /** The cell's resolved scenario; null when infeasible. */
  scenario: jsonb('scenario').$type<Scenario>(),
  infeasibleReason: text('infeasible_reason'),
  seed: bigint('seed', { mode: 'number' }).notNull(),
  status: cellStatusEnum('status').notNull().default('queued'),
  raysPlanned: bigint('rays_planned', { mode: 'number' }).notNull().default(0),
  raysDone: bigint('rays_done', { mode: 'number' }).notNull().default(0),
  /**
   * Merged integer tallies of the device and of its planar companion (Float64 little-endian, the core's Tally
   * layout): the compact stored form of the full result. The 1° profile, the θ–φ map and every σ follow from
   * these counts exactly (summarize in shared/optics), so they are expanded on request rather than stored twice.
   */
  deviceTally: bytea('device_tally'),
  planarTally: bytea('planar_tally'),
  /** Summary for lists and maps: extraction, enhancement, on-axis luminance with σ, losses (no arrays). */
  summary: jsonb('summary').$type<CellSummary>(),
  /** 'rays' (fixed count done), 'target' (precision reached) or 'cap' (ray cap hit before the target). */
  stopReason: text('stop_reason'),
  error: text('error'),
  computeMs: integer('compute_ms').notNull().default(0),
  engineVersion: text('engine_version'),
  startedAt: timestamp('started_at', { withTimezone: true }),
  finishedAt: timestamp('finished_at', { withTimezone: true }),
}, (t) => [uniqueIndex('run_cells_run_cell_key').on(t.runId, t.cellIndex)])

export const runBatches = pgTable('run_batches', {
  cellId: uuid('cell_id').notNull().references(() => runCells.id, { onDelete: 'cascade' }),
  batchIndex: integer('batch_index').notNull(),
  firstRay: bigint('first_ray', { mode: 'number' }).notNull(),
  rayCount: integer('ray_count').notNull(),
  jobId: uuid('job_id').notNull(),
  status: batchStatusEnum('status').notNull().default('queued'),
  attempts: integer('attempts').notNull().default(0),
  computeMs: integer('compute_ms'),
  worker: text('worker'),
  /** Last error a worker met on this batch (the batch is retried until its retries are used up). */
  error: text('error'),
  completedAt: timestamp('completed_at', { withTimezone: true }),
}, (t) => [
  primaryKey({ columns: [t.cellId, t.batchIndex] }),
  index('run_batches_job_idx').on(t.jobId),
  check('run_batches_rays_positive', sql`${t.rayCount} > 0`),
])

export type Run = typeof runs.$inferSelect
export type RunCell = typeof runCells.$inferSelect
export type RunBatch = typeof runBatches.$inferSelect

// Failed sign-ins in the last 15 minutes, by account key (the e-mail as typed, lower-cased) and client address;
// server/utils/sign-in-limit.ts throttles on them. Kept in the database so every web server process counts alike.
export const signInFailures = pgTable('sign_in_failures', {
  id: uuid('id').primaryKey().defaultRandom(),
  accountKey: text('account_key').notNull(),
  address: text('address').notNull(),
  at: timestamp('at', { withTimezone: true }).notNull().defaultNow(),
}, (t) => [index('sign_in_failures_account_idx').on(t.accountKey, t.at), index('sign_in_failures_address_idx').on(t.address, t.at)])

// Counted actions for volume limits (sign-ups and invitations per client address, invitations per team), kept for
// an hour; server/utils/volume-limit.ts counts and records them under an advisory lock, so requests arriving
// together cannot slip past the limit.
export const actionEvents = pgTable('action_events', {
  id: uuid('id').primaryKey().defaultRandom(),
  kind: text('kind').notNull(),
  key: text('key').notNull(),
  at: timestamp('at', { withTimezone: true }).notNull().defaultNow(),
}, (t) => [index('action_events_kind_key_idx').on(t.kind, t.key, t.at)])

export type User = typeof users.$inferSelect
export type Team = typeof teams.$inferSelect
export type Membership = typeof memberships.$inferSelect
export type Project = typeof projects.$inferSelect
export type Design = typeof designs.$inferSelect

// ── Team workflow: invitations, e-mail, tokens, shortlist, uploaded tables ─────────────────────────────────────
// Secrets (invitation links, reset links, API tokens) are stored only as the SHA-256 of a 32-byte random value: a
// stolen database copy does not open any of them, and a 256-bit random value needs no slow hash.

/** Mail captured by the fake SMTP server (development, demo and tests only; scripts/fake-smtp.ts writes here). */
export const mailboxMessages = pgTable('mailbox_messages', {
  id: uuid('id').primaryKey().defaultRandom(),
  mailFrom: text('mail_from').notNull(),
  rcptTo: jsonb('rcpt_to').$type<string[]>().notNull(),
  subject: text('subject').notNull().default(''),
  /** The whole RFC 5322 message as received. */
  raw: text('raw').notNull(),
  receivedAt: timestamp('received_at', { withTimezone: true }).notNull().defaultNow(),
}, (t) => [index('mailbox_messages_received_idx').on(t.receivedAt)])

export const invitations = pgTable('invitations', {
  id: uuid('id').primaryKey().defaultRandom(),
  teamId: uuid('team_id').notNull().references(() => teams.id, { onDelete: 'cascade' }),
  email: text('email').notNull(),
  role: roleEnum('role').notNull(),
  tokenHash: text('token_hash').notNull(),
  invitedBy: text('invited_by').references(() => users.id, { onDelete: 'set null' }),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  expiresAt: timestamp('expires_at', { withTimezone: true }).notNull(),
  acceptedAt: timestamp('accepted_at', { withTimezone: true }),
  acceptedBy: text('accepted_by').references(() => users.id, { onDelete: 'set null' }),
  revokedAt: timestamp('revoked_at', { withTimezone: true }),
  revokedBy: text('revoked_by').references(() => users.id, { onDelete: 'set null' }),
}, (t) => [uniqueIndex('invitations_token_key').on(t.tokenHash), index('invitations_team_idx').on(t.teamId, t.createdAt)])

export const passwordResets = pgTable('password_resets', {
  tokenHash: text('token_hash').primaryKey(),
  userId: text('user_id').notNull().references(() => users.id, { onDelete: 'cascade' }),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  expiresAt: timestamp('expires_at', { withTimezone: true }).notNull(),
  usedAt: timestamp('used_at', { withTimezone: true }),
}, (t) => [index('password_resets_user_idx').on(t.userId)])

export const apiTokens = pgTable('api_tokens', {
  id: uuid('id').primaryKey().defaultRandom(),
  userId: text('user_id').notNull().references(() => users.id, { onDelete: 'cascade' }),
  name: text('name').notNull(),
  tokenHash: text('token_hash').notNull(),
  /** The first characters of the token, shown in the account page so a user can tell tokens apart. */
  prefix: text('prefix').notNull(),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  lastUsedAt: timestamp('last_used_at', { withTimezone: true }),
  revokedAt: timestamp('revoked_at', { withTimezone: true }),
}, (t) => [uniqueIndex('api_tokens_hash_key').on(t.tokenHash), index('api_tokens_user_idx').on(t.userId)])

/** A bookmarked run cell (a single run's only cell or one grid point of a sweep) with its proposer's note. */
export const shortlistEntries = pgTable('shortlist_entries', {
  id: uuid('id').primaryKey().defaultRandom(),
  projectId: uuid('project_id').notNull().references(() => projects.id, { onDelete: 'cascade' }),
  runId: uuid('run_id').notNull().references(() => runs.id, { onDelete: 'cascade' }),
  cellIndex: integer('cell_index').notNull(),
  note: text('note').notNull().default(''),
  authorId: text('author_id').references(() => users.id, { onDelete: 'set null' }),
  chosen: boolean('chosen').notNull().default(false),
  chosenReason: text('chosen_reason'),
  chosenBy: text('chosen_by').references(() => users.id, { onDelete: 'set null' }),
  chosenAt: timestamp('chosen_at', { withTimezone: true }),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow(),
}, (t) => [
  uniqueIndex('shortlist_entries_cell_key').on(t.projectId, t.runId, t.cellIndex),
  // At most one chosen candidate per project.
  uniqueIndex('shortlist_entries_chosen_key').on(t.projectId).where(sql`${t.chosen}`),
])

export const shortlistComments = pgTable('shortlist_comments', {
  id: uuid('id').primaryKey().defaultRandom(),
  entryId: uuid('entry_id').notNull().references(() => shortlistEntries.id, { onDelete: 'cascade' }),
  authorId: text('author_id').references(() => users.id, { onDelete: 'set null' }),
  body: text('body').notNull(),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
}, (t) => [index('shortlist_comments_entry_idx').on(t.entryId, t.createdAt)])

/** Who changed what on a project's shortlist, and when (added, note edited, chosen, unchosen, removed, commented). */
export const shortlistEvents = pgTable('shortlist_events', {
  id: uuid('id').primaryKey().defaultRandom(),
  projectId: uuid('project_id').notNull().references(() => projects.id, { onDelete: 'cascade' }),
  entryId: uuid('entry_id').references(() => shortlistEntries.id, { onDelete: 'set null' }),
  actorId: text('actor_id').references(() => users.id, { onDelete: 'set null' }),
  action: text('action').notNull(),
  detail: jsonb('detail').notNull().default(sql`'{}'::jsonb`),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
}, (t) => [index('shortlist_events_project_idx').on(t.projectId, t.createdAt)])

export const dataTableKindEnum = pgEnum('data_table_kind', ['lens_profile', 'angular_profile', 'refractive_index', 'emission_spectrum'])

/** An uploaded, validated CSV table of a project: rows as numbers in the columns of its kind. */
export const dataTables = pgTable('data_tables', {
  id: uuid('id').primaryKey().defaultRandom(),
  projectId: uuid('project_id').notNull().references(() => projects.id, { onDelete: 'cascade' }),
  kind: dataTableKindEnum('kind').notNull(),
  name: text('name').notNull(),
  fileName: text('file_name').notNull(),
  columns: jsonb('columns').$type<string[]>().notNull(),
  rows: jsonb('rows').$type<number[][]>().notNull(),
  rowCount: integer('row_count').notNull(),
  /** A fitted stylus trace (lens profiles only): how it was fitted (method, RMS residual in nm, parameters) and the
   * fitted [r_um, height_um] rows, which are what a scenario traces; `rows` keeps the raw trace as uploaded. */
  fit: jsonb('fit').$type<Record<string, unknown>>(),
  fittedRows: jsonb('fitted_rows').$type<number[][]>(),
  /** The uploaded file as text, verbatim (comment lines with the instrument's metadata included). */
  sourceText: text('source_text'),
  uploadedBy: text('uploaded_by').references(() => users.id, { onDelete: 'set null' }),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
}, (t) => [uniqueIndex('data_tables_project_name_key').on(t.projectId, t.kind, t.name)])

export type Invitation = typeof invitations.$inferSelect
export type ApiToken = typeof apiTokens.$inferSelect
export type ShortlistEntry = typeof shortlistEntries.$inferSelect
export type DataTable = typeof dataTables.$inferSelect
