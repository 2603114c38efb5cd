// Table references in a scenario (shared/types/table-refs.ts) resolved against the database: only tables of the
// design's team count (another team's table reads exactly as an unknown one). Used when a design is saved (the
// design keeps the reference) and when a run or sweep is created (it stores the resolved, inline scenario).
import { and, eq, inArray } from 'drizzle-orm'
import { createError } from 'h3'
import type { z } from 'zod'
import { dataTables, projects } from '../db/schema'
import { scenarioErrorMessages, scenarioSchema, type Scenario } from '../../shared/types/scenario'
import { resolveTableRefs, tableRefsOf, type RefTable } from '../../shared/types/table-refs'
import type { Db } from './db'

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i

/** The referenced tables that belong to a project of `teamId`, by id (ids that are no uuid match nothing). */
async function teamTables(db: Db, teamId: string, ids: string[]): Promise<Map<string, RefTable>> {
  const wanted = [...new Set(ids.filter((id) => UUID.test(id)))]
  if (wanted.length === 0) return new Map()
  const rows = await db.select({ id: dataTables.id, kind: dataTables.kind, name: dataTables.name, rows: dataTables.rows })
    .from(dataTables).innerJoin(projects, eq(projects.id, dataTables.projectId))
    .where(and(inArray(dataTables.id, wanted), eq(projects.teamId, teamId)))
  return new Map(rows.map((r) => [r.id, r]))
}

/**
 * The scenario with every table reference replaced by the table's rows, parsed (defaults filled in); a 400 naming
 * each field otherwise (unknown table, another team's, wrong kind, not covering the spectrum, and whatever the
 * scenario schema says about the rows, e.g. n above 4 inside the spectrum's range).
 */
export async function resolveScenarioTables(db: Db, teamId: string, raw: unknown): Promise<Scenario> {
  const tables = await teamTables(db, teamId, tableRefsOf(raw).map((r) => r.tableId))
  const resolved = resolveTableRefs(raw, (id) => tables.get(id))
  const issues = resolved.errors.map((e) => ({ path: `scenario.${e.path}`, message: e.message }))
  let parsed: Scenario | null = null
  if (issues.length === 0) {
    const r = scenarioSchema.safeParse(resolved.scenario)
    if (r.success) parsed = r.data
    else {
      const msgs = scenarioErrorMessages(r.error as z.ZodError, resolved.scenario)
      r.error.issues.forEach((iss, i) => issues.push({ path: ['scenario', ...iss.path].map(String).join('.'), message: msgs[i]! }))
    }
  }
  if (parsed) return parsed
  throw createError({ statusCode: 400, statusMessage: 'Bad Request', message: issues.map((i) => i.message).join('; '), data: { issues } })
}
