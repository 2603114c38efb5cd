// Lensfield's relational schema. Row types are inferred from here ($inferSelect); never write them twice.
// users/sessions follow the column names lucia's PostgreSQL adapter queries (id, user_id, expires_at).
import { sql } from 'drizzle-orm'
import { check, integer, jsonb, pgEnum, pgTable, primaryKey, text, timestamp, uniqueIndex, uuid, index } from 'drizzle-orm/pg-core'

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
  scenario: jsonb('scenario').notNull(),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow(),
}, (t) => [
  uniqueIndex('designs_project_name_key').on(t.projectId, t.name),
  check('designs_version_positive', sql`${t.version} >= 1`),
])

export type User = typeof users.$inferSelect
export type Team = typeof teams.$inferSelect
export type Membership = typeof memberships.$inferSelect
export type Project = typeof projects.$inferSelect
export type Design = typeof designs.$inferSelect
