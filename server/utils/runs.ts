// Access to runs and sweeps (a run belongs to a project; the project's team decides) and the route-side glue to the
// run domain in server/runs. Another team's run is 404, like its project.
import { and, asc, desc, eq } from 'drizzle-orm'
import { createError, type H3Event } from 'h3'
import type { User } from 'lucia'
import { memberships, projects, runCells, runs, type Project, type Role, type Run } from '../db/schema'
import { summarizeStored, type RunTallies } from '../../shared/optics'
import { createRun, type CreateRunInput } from '../runs/create'
import { tallyFromBytes } from '../runs/db'
import { RunRequestError } from '../runs/plan'
import { requireDesignRole } from './access'
import { requireUser } from './auth'
import { useDb } from './db'
import { resolveScenarioTables } from './table-refs'

export async function requireRunRole(
  event: H3Event, runId: string, allowed: readonly Role[], what = 'this action',
): Promise<{ user: User; project: Project; run: Run; role: Role }> {
  const user = requireUser(event)
  const [row] = await useDb().select({ run: runs, project: projects, role: memberships.role }).from(runs)
    .innerJoin(projects, eq(projects.id, runs.projectId))
    .innerJoin(memberships, and(eq(memberships.teamId, projects.teamId), eq(memberships.userId, user.id)))
    .where(eq(runs.id, runId))
  if (!row) throw createError({ statusCode: 404, statusMessage: 'Not Found', message: 'Run not found among your teams\' projects.' })
  if (!allowed.includes(row.role)) {
    throw createError({
      statusCode: 403,
      statusMessage: 'Forbidden',
      message: `Your role in this team is ${row.role}; ${what} needs ${allowed.join(' or ')}. Ask a team lead to change your role.`,
    })
  }
  return { user, project: row.project, run: row.run, role: row.role }
}

/** Validates access to the design, then creates the run or sweep; request problems become 400/422/429. */
export async function startRunFromRequest(
  event: H3Event,
  body: { designId: string } & Omit<CreateRunInput, 'kind' | 'projectId' | 'teamId' | 'design' | 'userId'>,
  kind: 'single' | 'sweep',
) {
  const { user, project, design } = await requireDesignRole(event, body.designId, ['lead', 'designer'],
    kind === 'sweep' ? 'starting a sweep' : 'starting a run')
  // The run stores the scenario with its table references replaced by the tables' rows (reproducible if a table
  // changes or is deleted later); an unusable reference is a 400 naming the field.
  const scenario = await resolveScenarioTables(useDb(), project.teamId, design.scenario)
  try {
    return await createRun({
      ...body,
      kind,
      projectId: project.id,
      teamId: project.teamId,
      design: { id: design.id, name: design.name, version: design.version, scenario },
      userId: user.id,
    })
  } catch (err) {
    if (err instanceof RunRequestError) {
      throw createError({
        statusCode: err.statusCode,
        statusMessage: err.statusCode === 429 ? 'Too Many Requests' : err.statusCode === 422 ? 'Unprocessable Entity' : 'Bad Request',
        message: err.message,
        data: { details: err.details },
      })
    }
    throw err
  }
}

/** Runs of a project, newest first, without the heavy columns. */
export function listRuns(projectId: string, kind?: 'single' | 'sweep') {
  const where = kind ? and(eq(runs.projectId, projectId), eq(runs.kind, kind)) : eq(runs.projectId, projectId)
  return useDb().select({
    id: runs.id, kind: runs.kind, name: runs.name, designId: runs.designId, designName: runs.designName,
    designVersion: runs.designVersion, status: runs.status, figure: runs.figure, cellsTotal: runs.cellsTotal,
    cellsFinished: runs.cellsFinished, raysPlanned: runs.raysPlanned, raysDone: runs.raysDone,
    bestCellIndex: runs.bestCellIndex, createdAt: runs.createdAt, finishedAt: runs.finishedAt,
  }).from(runs).where(where).orderBy(desc(runs.createdAt)).limit(200)
}

/** Every cell of a run with its compact figures (no counts). */
export function listCellSummaries(runId: string) {
  return useDb().select({
    cellIndex: runCells.cellIndex, coordinates: runCells.coordinates, status: runCells.status,
    infeasibleReason: runCells.infeasibleReason, seed: runCells.seed, raysDone: runCells.raysDone,
    summary: runCells.summary, stopReason: runCells.stopReason, error: runCells.error, computeMs: runCells.computeMs,
  }).from(runCells).where(eq(runCells.runId, runId)).orderBy(asc(runCells.cellIndex))
}

/** One cell with its full result expanded from the stored counts (null result while nothing is counted yet). */
export async function cellResult(runId: string, cellIndex: number) {
  const [cell] = await useDb().select().from(runCells)
    .where(and(eq(runCells.runId, runId), eq(runCells.cellIndex, cellIndex)))
  if (!cell) return null
  const { deviceTally, planarTally, ...rest } = cell
  const device = tallyFromBytes(deviceTally)
  const tallies: RunTallies | null = device ? { device, planar: tallyFromBytes(planarTally) } : null
  return { cell: rest, result: tallies ? summarizeStored(tallies, cell.seed, cell.scenario) : null }
}
