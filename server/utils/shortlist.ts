// The project's shortlist: bookmarked run cells with a note. Any member adds, edits their own note and comments;
// only a lead marks one entry chosen (with a reason) or takes the mark off again. Every change is written with its
// actor into shortlist_events in the same transaction, so the history is complete.
import { and, asc, desc, eq, sql } from 'drizzle-orm'
import { createError, type H3Event } from 'h3'
import type { User } from 'lucia'
import { memberships, projects, runCells, runs, shortlistComments, shortlistEntries, shortlistEvents, users, type Project, type Role, type ShortlistEntry } from '../db/schema'
import { figureOf } from '../../shared/types/figures'
import { requireUser } from './auth'
import { useDb, type Db, type DbOrTx } from './db'

const UNIQUE_VIOLATION = '23505'
/** Drizzle wraps the driver's error; the Postgres code sits on it or on its cause. */
const isUniqueViolation = (err: unknown) => {
  const e = err as { code?: string; cause?: { code?: string } }
  return e?.code === UNIQUE_VIOLATION || e?.cause?.code === UNIQUE_VIOLATION
}

export async function requireShortlistRole(event: H3Event, entryId: string, allowed: readonly Role[], what = 'this action'):
Promise<{ user: User; project: Project; entry: ShortlistEntry; role: Role }> {
  const user = requireUser(event)
  const [row] = await useDb().select({ entry: shortlistEntries, project: projects, role: memberships.role }).from(shortlistEntries)
    .innerJoin(projects, eq(projects.id, shortlistEntries.projectId))
    .innerJoin(memberships, and(eq(memberships.teamId, projects.teamId), eq(memberships.userId, user.id)))
    .where(eq(shortlistEntries.id, entryId))
  if (!row) throw createError({ statusCode: 404, statusMessage: 'Not Found', message: 'Shortlist entry not found among your teams\' projects.' })
  if (!allowed.includes(row.role)) {
    throw createError({ statusCode: 403, statusMessage: 'Forbidden', message: `Your role in this team is ${row.role}; ${what} needs ${allowed.join(' or ')}. Ask a team lead to do it.` })
  }
  return { user, project: row.project, entry: row.entry, role: row.role }
}

function logEvent(tx: DbOrTx, projectId: string, entryId: string | null, actorId: string, action: string, detail: Record<string, unknown> = {}) {
  return tx.insert(shortlistEvents).values({ projectId, entryId, actorId, action, detail })
}

export async function addToShortlist(db: Db, projectId: string, userId: string, input: { runId: string; cellIndex: number; note: string }) {
  const [cell] = await db.select({ status: runCells.status, projectId: runs.projectId }).from(runCells)
    .innerJoin(runs, eq(runs.id, runCells.runId))
    .where(and(eq(runCells.runId, input.runId), eq(runCells.cellIndex, input.cellIndex)))
  if (!cell || cell.projectId !== projectId) {
    throw createError({ statusCode: 404, statusMessage: 'Not Found', message: `Run ${input.runId} has no cell ${input.cellIndex} in this project.` })
  }
  try {
    return await db.transaction(async (tx) => {
      const [entry] = await tx.insert(shortlistEntries).values({ projectId, runId: input.runId, cellIndex: input.cellIndex, note: input.note,
        authorId: userId }).returning()
      await logEvent(tx, projectId, entry!.id, userId, 'added', { runId: input.runId, cellIndex: input.cellIndex, note: input.note, entry: await entryLabel(tx, entry!.id) })
      return entry!
    })
  } catch (err) {
    if (isUniqueViolation(err)) {
      throw createError({ statusCode: 409, statusMessage: 'Conflict', message: 'This cell is already on the shortlist; add a comment to its note instead.' })
    }
    throw err
  }
}

export async function editNote(db: Db, entry: ShortlistEntry, user: { id: string }, role: Role, note: string) {
  if (entry.authorId !== user.id && role !== 'lead') {
    throw createError({ statusCode: 403, statusMessage: 'Forbidden', message: 'Only the author of a note or a lead can change it; add a comment instead.' })
  }
  return db.transaction(async (tx) => {
    const [row] = await tx.update(shortlistEntries).set({ note, updatedAt: new Date() }).where(eq(shortlistEntries.id, entry.id)).returning()
    await logEvent(tx, entry.projectId, entry.id, user.id, 'note-edited', { from: entry.note, to: note, entry: await entryLabel(tx, entry.id) })
    return row!
  })
}

/** How an entry is named ("Sweep A · seed 7 · cell 3 · Hex caps v2 “note”"): the same in the panel and the
 * history; kept in the event so it stays readable after the entry is removed. */
export function shortlistLabel(r: { run: string; seed: number; cell: number; design: string; version: number; note: string }) {
  const note = r.note.trim()
  return `${r.run} · seed ${r.seed} · cell ${r.cell} · ${r.design} v${r.version}${note ? ` “${note.length > 40 ? `${note.slice(0, 39)}…` : note}”` : ''}`
}

async function entryLabel(tx: DbOrTx, entryId: string): Promise<string> {
  const [r] = await tx.select({ run: runs.name, seed: runs.seed, cell: shortlistEntries.cellIndex, design: runs.designName, version: runs.designVersion,
    note: shortlistEntries.note })
    .from(shortlistEntries).innerJoin(runs, eq(runs.id, shortlistEntries.runId)).where(eq(shortlistEntries.id, entryId))
  return r ? shortlistLabel(r) : 'a removed entry'
}

/**
 * Marks the entry chosen. When another entry holds the mark, the lead must confirm the move (replaceChosen);
 * otherwise 409 names the current choice. The previous choice loses the mark in the same transaction, and both
 * events name both entries.
 */
export async function chooseEntry(db: Db, entry: ShortlistEntry, userId: string, reason: string, replaceChosen = false) {
  return db.transaction(async (tx) => {
    // Lock the project's entries so two leads choosing at once are serialised.
    await tx.execute(sql`SELECT id FROM shortlist_entries WHERE project_id = ${entry.projectId} FOR UPDATE`)
    const [current] = await tx.select({ id: shortlistEntries.id }).from(shortlistEntries)
      .where(and(eq(shortlistEntries.projectId, entry.projectId), eq(shortlistEntries.chosen, true)))
    const label = await entryLabel(tx, entry.id)
    const previousLabel = current && current.id !== entry.id ? await entryLabel(tx, current.id) : null
    if (previousLabel && !replaceChosen) {
      throw createError({
        statusCode: 409, statusMessage: 'Conflict',
        message: `${previousLabel} is the chosen candidate now. Confirm moving the mark to ${label} (replaceChosen: true), or keep the current choice.`,
        data: { chosenEntryId: current!.id, chosenLabel: previousLabel },
      })
    }
    if (current) {
      await tx.update(shortlistEntries).set({ chosen: false, chosenReason: null, chosenBy: null, chosenAt: null, updatedAt: new Date() })
        .where(eq(shortlistEntries.id, current.id))
    }
    if (previousLabel) await logEvent(tx, entry.projectId, current!.id, userId, 'unchosen', { entry: previousLabel, replacedBy: entry.id, replacedByLabel: label })
    const now = new Date()
    const [row] = await tx.update(shortlistEntries).set({ chosen: true, chosenReason: reason, chosenBy: userId, chosenAt: now, updatedAt: now })
      .where(eq(shortlistEntries.id, entry.id)).returning()
    await logEvent(tx, entry.projectId, entry.id, userId, 'chosen', { reason, entry: label, previous: previousLabel ? current!.id : null, previousLabel })
    return row!
  })
}

export async function unchooseEntry(db: Db, entry: ShortlistEntry, userId: string) {
  if (!entry.chosen) throw createError({ statusCode: 409, statusMessage: 'Conflict', message: 'This entry is not the chosen candidate.' })
  return db.transaction(async (tx) => {
    const [row] = await tx.update(shortlistEntries).set({ chosen: false, chosenReason: null, chosenBy: null, chosenAt: null, updatedAt: new Date() })
      .where(eq(shortlistEntries.id, entry.id)).returning()
    await logEvent(tx, entry.projectId, entry.id, userId, 'unchosen', { reason: entry.chosenReason, entry: await entryLabel(tx, entry.id) })
    return row!
  })
}

export async function removeEntry(db: Db, entry: ShortlistEntry, user: { id: string }, role: Role) {
  if (entry.chosen && role !== 'lead') throw createError({ statusCode: 403, statusMessage: 'Forbidden', message: 'The chosen candidate can only be removed by a lead.' })
  if (entry.authorId !== user.id && role !== 'lead') throw createError({ statusCode: 403, statusMessage: 'Forbidden', message: 'Only the author of an entry or a lead can remove it.' })
  await db.transaction(async (tx) => {
    await logEvent(tx, entry.projectId, entry.id, user.id, 'removed', { runId: entry.runId, cellIndex: entry.cellIndex, note: entry.note, entry: await entryLabel(tx, entry.id) })
    await tx.delete(shortlistEntries).where(eq(shortlistEntries.id, entry.id))
  })
}

export async function addComment(db: Db, entry: ShortlistEntry, userId: string, body: string) {
  return db.transaction(async (tx) => {
    const [c] = await tx.insert(shortlistComments).values({ entryId: entry.id, authorId: userId, body }).returning()
    await logEvent(tx, entry.projectId, entry.id, userId, 'commented', { commentId: c!.id, entry: await entryLabel(tx, entry.id) })
    return c!
  })
}

export function listComments(db: Db, entryId: string) {
  return db.select({ id: shortlistComments.id, body: shortlistComments.body, createdAt: shortlistComments.createdAt, authorId: shortlistComments.authorId,
    author: users.name })
    .from(shortlistComments).leftJoin(users, eq(users.id, shortlistComments.authorId))
    .where(eq(shortlistComments.entryId, entryId)).orderBy(asc(shortlistComments.createdAt))
}

/** The shortlist with each cell's headline figure ± σ and geometry; the chosen entry first, then newest first. */
export async function listShortlist(db: Db, projectId: string) {
  const author = sql<string | null>`(SELECT name FROM users WHERE id = ${shortlistEntries.authorId})`
  const chooser = sql<string | null>`(SELECT name FROM users WHERE id = ${shortlistEntries.chosenBy})`
  const comments = sql<number>`(SELECT count(*)::int FROM shortlist_comments c WHERE c.entry_id = ${shortlistEntries.id})`
  const rows = await db.select({
    entry: shortlistEntries, author, chooser, comments,
    runName: runs.name, runSeed: runs.seed, runKind: runs.kind, figure: runs.figure, designName: runs.designName, designVersion: runs.designVersion,
    coordinates: runCells.coordinates, scenario: runCells.scenario, summary: runCells.summary, cellStatus: runCells.status, axes: runs.axes,
  }).from(shortlistEntries)
    .innerJoin(runs, eq(runs.id, shortlistEntries.runId))
    .leftJoin(runCells, and(eq(runCells.runId, shortlistEntries.runId), eq(runCells.cellIndex, shortlistEntries.cellIndex)))
    .where(eq(shortlistEntries.projectId, projectId))
    .orderBy(desc(shortlistEntries.chosen), desc(shortlistEntries.createdAt))
  return rows.map((r) => {
    const lens = (r.scenario as { lensArray?: Record<string, unknown> | null } | null)?.lensArray ?? null
    return {
      ...r.entry,
      author: r.author,
      chosenByName: r.chooser,
      comments: r.comments,
      label: shortlistLabel({ run: r.runName, seed: r.runSeed, cell: r.entry.cellIndex, design: r.designName, version: r.designVersion, note: r.entry.note }),
      run: { name: r.runName, seed: r.runSeed, kind: r.runKind, figure: r.figure, designName: r.designName, designVersion: r.designVersion, axes: r.axes },
      cell: { status: r.cellStatus, coordinates: r.coordinates },
      figure: figureOf(r.summary, r.figure),
      summary: r.summary,
      geometry: lens ? { lattice: lens.lattice, pitchUm: lens.pitchUm, diameterUm: lens.diameterUm, sagUm: lens.sagUm, shape: lens.shape } : null,
    }
  })
}

export function listShortlistHistory(db: Db, projectId: string) {
  return db.select({ id: shortlistEvents.id, entryId: shortlistEvents.entryId, action: shortlistEvents.action, detail: shortlistEvents.detail,
    createdAt: shortlistEvents.createdAt, actorId: shortlistEvents.actorId, actor: users.name })
    .from(shortlistEvents).leftJoin(users, eq(users.id, shortlistEvents.actorId))
    .where(eq(shortlistEvents.projectId, projectId)).orderBy(desc(shortlistEvents.createdAt)).limit(500)
}
