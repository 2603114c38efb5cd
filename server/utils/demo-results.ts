// Demo results for the invented Tallowby scenario: a finished single run, a finished 6 × 6 radius of curvature ×
// fill factor sweep, and a shortlist with one chosen candidate and a comment, so the first page a newcomer opens
// shows the job done. Every figure is traced here with the real engine (shared/optics, in-process, fixed seeds,
// small ray counts so start-up stays quick); the rows are written exactly as the batch worker would have left them
// (counts, summary, one done batch per cell). Addressed by natural key (run name in the demo project, the entry's
// cell), inserted only when missing, so loading twice changes nothing.
import { randomUUID } from 'node:crypto'
import { and, eq, sql } from 'drizzle-orm'
import { createTally, mergeRunTallies, planChunks, prepareRun, summarizeStored, traceChunk, type RunTallies } from '../../shared/optics'
import { ENGINE_VERSION } from '../../shared/optics/version'
import { scenarioSchema } from '../../shared/types/scenario'
import { cellSeed, expandSweep, type SweepAxis } from '../../shared/types/sweep'
import { designs, runBatches, runCells, runs, shortlistComments, shortlistEntries, shortlistEvents, users } from '../db/schema'
import { bestCellIndex, cellSummaryOf } from '../../shared/types/figures'
import { tallyToBytes } from '../runs/db'
import { tracedRaysPerRay } from '../runs/plan'
import type { Db } from './db'
import { DEMO_PROJECT, DEMO_TEAM } from './demo'

export const DEMO_RUN = {
  name: 'Hex hemispheres 10 µm: first look',
  design: 'Hex hemispheres, 10 µm',
  rays: 200_000,
  seed: 11,
  author: 'tomas.okafor@tallowby.example',
}

export const DEMO_SWEEP = {
  name: 'Shallow caps: radius of curvature × fill factor',
  design: 'Hex shallow caps, 10 µm, sag 2.5 µm',
  rays: 50_000,
  seed: 23,
  author: 'tomas.okafor@tallowby.example',
  axes: [
    { parameter: 'lensArray.radiusOfCurvatureUm', values: [5.5, 6.5, 8, 10, 13, 18] },
    { parameter: 'lensArray.fillFactor', values: [0.4, 0.5, 0.6, 0.7, 0.8, 0.9] },
  ] satisfies SweepAxis[],
}

export const DEMO_SHORTLIST = {
  note: 'Highest gain in the shallow-cap sweep; the mould shop can cut this radius.',
  noteBy: 'tomas.okafor@tallowby.example',
  chosenReason: 'Best gain inside the embossing line\'s sag limit; go to a first mould.',
  chosenBy: 'ines.marlow@tallowby.example',
  comment: 'Checked the cross-section against the line\'s 5 µm sag limit: fits with margin.',
  commentBy: 'priya.halden@tallowby.example',
}

/** Traces one cell's scenario from ray 0 in the core's fixed chunks, as the workers would. */
function traceCell(scenario: unknown, rays: number, seed: number): RunTallies {
  const sc = scenarioSchema.parse(scenario)
  const scenes = prepareRun(sc)
  const total: RunTallies = { device: createTally(), planar: scenes.planar ? createTally() : null }
  for (const [first, count] of planChunks(rays)) mergeRunTallies(total, traceChunk(scenes, first, count, seed))
  return total
}

async function demoContext(db: Db) {
  const rows = await db.execute<{ project_id: string }>(
    // the demo project of the demo team, by natural key
    sql`SELECT p.id AS project_id FROM projects p JOIN teams t ON t.id = p.team_id
      WHERE t.slug = ${DEMO_TEAM.slug} AND p.name = ${DEMO_PROJECT.name}`)
  const projectId = rows.rows[0]?.project_id
  if (!projectId) throw new Error('Demo results need the demo project: call loadDemoData first.')
  const userId = async (email: string) => (await db.select({ id: users.id }).from(users).where(eq(users.email, email)))[0]!.id
  const design = async (name: string) => (await db.select().from(designs).where(and(eq(designs.projectId, projectId), eq(designs.name, name))))[0]
  return { projectId, userId, design }
}

async function ensureRun(db: Db, projectId: string, spec: { name: string; design: string; rays: number; seed: number; author: string; axes?: SweepAxis[] },
  ctx: Awaited<ReturnType<typeof demoContext>>): Promise<string | null> {
  const [existing] = await db.select({ id: runs.id }).from(runs).where(and(eq(runs.projectId, projectId), eq(runs.name, spec.name)))
  if (existing) return existing.id
  const design = await ctx.design(spec.design)
  if (!design) return null // the demo design was renamed or removed by a user: leave it be
  const base = scenarioSchema.parse(design.scenario)
  const kind = spec.axes ? 'sweep' as const : 'single' as const
  const cells = spec.axes ? expandSweep(base, spec.axes) : [{ index: 0, coordinates: [] as number[], feasible: true as const, scenario: base }]
  // Trace before opening the transaction: nothing is written if the engine refuses a cell.
  const traced = cells.map((c) => {
    if (!c.feasible) return { cell: c, tallies: null, summary: null, seed: cellSeed(spec.seed, c.index) }
    const seed = kind === 'single' ? spec.seed : cellSeed(spec.seed, c.index)
    const tallies = traceCell(c.scenario, spec.rays, seed)
    return { cell: c, tallies, summary: cellSummaryOf(summarizeStored(tallies, seed, c.scenario)), seed }
  })
  const figure = 'enhancement'
  const best = bestCellIndex(traced.map((t) => ({ cellIndex: t.cell.index, status: t.summary ? 'done' as const : 'infeasible' as const, summary: t.summary })), figure)
  const raysOf = (t: (typeof traced)[number]) => (t.tallies && t.cell.feasible ? spec.rays * tracedRaysPerRay(t.cell.scenario) : 0)
  const raysTotal = traced.reduce((n, t) => n + raysOf(t), 0)
  const authorId = await ctx.userId(spec.author)
  const now = new Date()
  return db.transaction(async (tx) => {
    const [run] = await tx.insert(runs).values({
      projectId, designId: design.id, designVersion: design.version, designName: design.name, kind, name: spec.name,
      baseScenario: base, axes: spec.axes ?? [], figure, seed: spec.seed, raysPerCell: spec.rays, batchRays: spec.rays,
      status: 'done', cellsTotal: cells.length, cellsFinished: cells.length, raysPlanned: raysTotal, raysDone: raysTotal,
      bestCellIndex: best, engineVersion: ENGINE_VERSION, createdBy: authorId, startedAt: now, finishedAt: now,
    }).returning({ id: runs.id })
    const cellRows = await tx.insert(runCells).values(traced.map((t) => ({
      runId: run!.id, cellIndex: t.cell.index, coordinates: t.cell.coordinates,
      scenario: t.cell.feasible ? t.cell.scenario : null, infeasibleReason: t.cell.feasible ? null : t.cell.reason,
      seed: t.seed, status: t.summary ? 'done' as const : 'infeasible' as const,
      raysPlanned: t.tallies ? spec.rays : 0, raysDone: t.tallies ? spec.rays : 0,
      deviceTally: t.tallies ? tallyToBytes(t.tallies.device) : null, planarTally: t.tallies ? tallyToBytes(t.tallies.planar) : null,
      summary: t.summary, stopReason: t.summary ? 'rays' : null, engineVersion: t.summary ? ENGINE_VERSION : null,
      startedAt: t.summary ? now : null, finishedAt: t.summary ? now : null,
    }))).returning({ id: runCells.id, cellIndex: runCells.cellIndex, status: runCells.status })
    const batches = cellRows.filter((c) => c.status === 'done').map((c) => ({
      cellId: c.id, batchIndex: 0, firstRay: 0, rayCount: spec.rays, jobId: randomUUID(), status: 'done' as const,
      attempts: 1, worker: 'demo-loader', completedAt: now,
    }))
    for (let i = 0; i < batches.length; i += 500) await tx.insert(runBatches).values(batches.slice(i, i + 500))
    return run!.id
  })
}

/** Loads the demo results (after loadDemoData); returns the ids of the demo run and sweep. */
export async function loadDemoResults(db: Db): Promise<{ runId: string | null, sweepId: string | null }> {
  const ctx = await demoContext(db)
  const runId = await ensureRun(db, ctx.projectId, DEMO_RUN, ctx)
  const sweepId = await ensureRun(db, ctx.projectId, DEMO_SWEEP, ctx)
  if (!sweepId) return { runId, sweepId }
  const [sweep] = await db.select({ best: runs.bestCellIndex }).from(runs).where(eq(runs.id, sweepId))
  if (sweep?.best === null || sweep?.best === undefined) return { runId, sweepId }
  const [onList] = await db.select({ id: shortlistEntries.id }).from(shortlistEntries)
    .where(and(eq(shortlistEntries.projectId, ctx.projectId), eq(shortlistEntries.runId, sweepId), eq(shortlistEntries.cellIndex, sweep.best)))
  if (onList) return { runId, sweepId }
  const [designer, lead, viewer] = await Promise.all([DEMO_SHORTLIST.noteBy, DEMO_SHORTLIST.chosenBy, DEMO_SHORTLIST.commentBy].map(ctx.userId))
  await db.transaction(async (tx) => {
    const [anyChosen] = await tx.select({ id: shortlistEntries.id }).from(shortlistEntries)
      .where(and(eq(shortlistEntries.projectId, ctx.projectId), eq(shortlistEntries.chosen, true)))
    // A choice a user made since stays: the demo entry is then added without the mark.
    const chosen = !anyChosen
    const now = new Date()
    const [entry] = await tx.insert(shortlistEntries).values({
      projectId: ctx.projectId, runId: sweepId, cellIndex: sweep.best!, note: DEMO_SHORTLIST.note, authorId: designer,
      chosen, chosenReason: chosen ? DEMO_SHORTLIST.chosenReason : null, chosenBy: chosen ? lead : null, chosenAt: chosen ? now : null,
    }).returning({ id: shortlistEntries.id })
    const [comment] = await tx.insert(shortlistComments).values({ entryId: entry!.id, authorId: viewer,
      body: DEMO_SHORTLIST.comment }).returning({ id: shortlistComments.id })
    await tx.insert(shortlistEvents).values([
      { projectId: ctx.projectId, entryId: entry!.id, actorId: designer, action: 'added', detail: { runId: sweepId, cellIndex: sweep.best, note: DEMO_SHORTLIST.note } },
      ...(chosen ? [{ projectId: ctx.projectId, entryId: entry!.id, actorId: lead, action: 'chosen', detail: { reason: DEMO_SHORTLIST.chosenReason, previous: null } }] : []),
      { projectId: ctx.projectId, entryId: entry!.id, actorId: viewer, action: 'commented', detail: { commentId: comment!.id } },
    ])
  })
  return { runId, sweepId }
}
