// Set-up shared by the queue benches (bench/sweep.ts, bench/scale-out.ts): a throwaway PostgreSQL with Lensfield's
// schema, DATABASE_URL pointing at it, the compiled trace worker, and a bench team, project and design in which runs
// are created with the route's own code (server/runs/create.ts) and queued in pg-boss. Deleted again on exit.
import { randomUUID } from 'node:crypto'
import { readdirSync, readFileSync } from 'node:fs'
import { join } from 'node:path'
import type { Figure } from '../shared/types/figures'
import type { SweepAxis } from '../shared/types/sweep'
import { createDatabase, ensurePostgres, migrateDatabase, stopOnExit } from '../scripts/postgres'

/** The sweep every queue bench traces: hexagonal spherical caps, pitch 10 µm, on the close-packed example's stack. */
export function benchSweepScenario(raysPerCell: number) {
  return {
    emitter: { index: 1.7, angularProfile: 'isotropic', source: { shape: 'extended' } },
    reflector: { reflectance: 0.8, diffuseFraction: 0 },
    substrate: { index: 1.5, thicknessUm: 100, absorptionPerMm: 0 },
    lensArray: { lattice: 'hexagonal', pitchUm: 10, diameterUm: 10, sagUm: 3, shape: 'spherical', index: 1.5 },
    trace: { rays: raysPerCell, seed: 7, fresnel: 'averaged', maxEvents: 10_000 },
  }
}

/** Radius of curvature from 5.2 µm (just above D/2 at the largest fill factor) to 14 µm × fill factor 0.3 to 0.9. */
export function benchSweepAxes(steps: number): SweepAxis[] {
  return [
    { parameter: 'lensArray.radiusOfCurvatureUm', start: 5.2, stop: 14, steps },
    { parameter: 'lensArray.fillFactor', start: 0.3, stop: 0.9, steps },
  ]
}

/** A finished (or failed) run as the benches read it. */
export interface RunRow {
  status: string
  cellsTotal: number
  cellsFinished: number
  raysDone: number
  bestCellIndex: number | null
  /** Batches and their summed trace time on the workers' threads (run_batches.compute_ms), queue and commit excluded. */
  batches: number
  computeSeconds: number
}

export interface BenchQueue {
  url: string
  /** The cluster's folder (null when DATABASE_URL named an existing server). */
  dataDir: string | null
  /** Creates a run with the route's code; `batchRays` is the run's batch size (LENSFIELD_BATCH_RAYS at creation). */
  createRun(opts: { kind: 'single' | 'sweep'; rays: number; batchRays: number; axes?: SweepAxis[]; figure?: Figure; seed?: number }): Promise<string>
  waitDone(id: string): Promise<RunRow>
  /** Connections to the bench database now, by application_name ('' for the app's own pool). */
  connections(): Promise<Record<string, number>>
  close(): Promise<void>
}

/**
 * Starts a throwaway PostgreSQL (or uses DATABASE_URL's server), makes a fresh database, migrates it, sets
 * DATABASE_URL and LENSFIELD_TRACE_WORKER for this process and the workers it spawns, and stores the design.
 */
export async function startBenchQueue(prefix: string, scenario: unknown): Promise<BenchQueue> {
  const server = await ensurePostgres({ database: 'postgres', throwaway: true })
  stopOnExit(() => server.stop())
  const url = await createDatabase(server.adminUrl, `${prefix}_${Date.now().toString(36)}`)
  await migrateDatabase(url)
  process.env.DATABASE_URL = url
  const { prepareWorker } = await import('../scripts/trace-pool')
  process.env.LENSFIELD_TRACE_WORKER = await prepareWorker()

  // Imported after DATABASE_URL is set: these modules read it on first use.
  const { useDb, usePool } = await import('../server/utils/db')
  const schema = await import('../server/db/schema')
  const { createRun } = await import('../server/runs/create')
  const { stopBoss } = await import('../server/queue/boss')

  const db = useDb()
  const userId = `bench-${randomUUID()}`
  await db.insert(schema.users).values({ id: userId, email: `${userId}@bench.example`, name: 'Bench', passwordHash: '-' })
  const [team] = await db.insert(schema.teams).values({ slug: userId, name: 'Bench' }).returning()
  await db.insert(schema.memberships).values({ teamId: team!.id, userId, role: 'lead' })
  const [project] = await db.insert(schema.projects).values({ teamId: team!.id, name: 'Bench' }).returning()
  const [design] = await db.insert(schema.designs).values({ projectId: project!.id, name: 'Bench caps', scenario, authorId: userId }).returning()

  return {
    url,
    dataDir: server.dataDir,
    async createRun(opts) {
      // The batch size is read from the environment when a run is created and stored on the run.
      process.env.LENSFIELD_BATCH_RAYS = String(opts.batchRays)
      const run = await createRun({
        kind: opts.kind, projectId: project!.id, teamId: team!.id, userId, axes: opts.axes, figure: opts.figure, seed: opts.seed,
        design: { id: design!.id, name: design!.name, version: 1, scenario }, precision: { rays: opts.rays },
      })
      return run.id
    },
    async waitDone(id) {
      for (;;) {
        const { rows: [r] } = await usePool().query(
          'SELECT status, cells_total, cells_finished, rays_done, best_cell_index FROM runs WHERE id = $1', [id])
        if (r.status !== 'queued' && r.status !== 'running') {
          const { rows: [b] } = await usePool().query(
            `SELECT count(*)::int AS n, COALESCE(sum(b.compute_ms), 0)::float8 AS ms FROM run_batches b
             JOIN run_cells c ON c.id = b.cell_id WHERE c.run_id = $1`, [id])
          return {
            status: r.status, cellsTotal: r.cells_total, cellsFinished: r.cells_finished, raysDone: Number(r.rays_done),
            bestCellIndex: r.best_cell_index, batches: b.n, computeSeconds: b.ms / 1000,
          }
        }
        await new Promise((res) => setTimeout(res, 50))
      }
    },
    async connections() {
      const { rows } = await usePool().query(
        `SELECT COALESCE(application_name, '') AS app, count(*)::int AS n FROM pg_stat_activity
         WHERE datname = current_database() GROUP BY 1`)
      return Object.fromEntries(rows.map((r) => [r.app, r.n]))
    },
    async close() {
      await stopBoss()
      await usePool().end()
    },
  }
}

/**
 * CPU seconds (user + system) the PostgreSQL server of `dataDir` has used so far: the postmaster and its live
 * children (backends, background processes) from /proc. Backends that ended earlier are not counted, so compare
 * readings taken while the same connections are open. Null where /proc or the cluster's pid file is missing.
 */
export function postgresCpuSeconds(dataDir: string | null): number | null {
  if (!dataDir) return null
  try {
    const postmaster = Number(readFileSync(join(dataDir, 'postmaster.pid'), 'utf8').split('\n')[0])
    const ticksPerSecond = 100 // USER_HZ on Linux
    let ticks = 0
    for (const entry of readdirSync('/proc')) {
      if (!/^\d+$/.test(entry)) continue
      let stat: string
      try { stat = readFileSync(`/proc/${entry}/stat`, 'utf8') } catch { continue }
      // "pid (comm) state ppid … utime stime …": fields after the last ')' start at state (field 3).
      const f = stat.slice(stat.lastIndexOf(')') + 2).split(' ')
      const pid = Number(entry)
      if (pid !== postmaster && Number(f[1]) !== postmaster) continue
      ticks += Number(f[11]) + Number(f[12])
    }
    return ticks / ticksPerSecond
  } catch {
    return null
  }
}
