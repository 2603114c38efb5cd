// npm run bench (second part): a sweep end to end through the queue. A 10 × 10 grid of lens radius of curvature
// against fill factor (hexagonal, pitch 10 µm, 200 000 rays per cell; the flat companion by quadrature since
// 2026-12-02, before that traced with as many rays again) is created
// with the same code the route uses, queued in pg-boss on a throwaway PostgreSQL, and traced by a batch worker
// with 1 thread, then again with 2. Prints the wall time from "created" to "done" and the ratio of the two.
// Usage: npm run bench:sweep -- [--rays-per-cell N] [--steps N]
import { randomUUID } from 'node:crypto'
import { availableParallelism } from 'node:os'
import { parseArgs } from 'node:util'
import { createDatabase, ensurePostgres, migrateDatabase, stopOnExit } from '../scripts/postgres'

const { values } = parseArgs({ options: { 'rays-per-cell': { type: 'string' }, steps: { type: 'string' } }, strict: false })
const raysPerCell = Number(values['rays-per-cell'] ?? 200_000)
const steps = Number(values.steps ?? 10)

const server = await ensurePostgres({ database: 'postgres', throwaway: true })
stopOnExit(() => server.stop())
const url = await createDatabase(server.adminUrl, `lensfield_bench_${Date.now().toString(36)}`)
await migrateDatabase(url)
process.env.DATABASE_URL = url
process.env.LENSFIELD_BATCH_RAYS ??= '200000'
const { prepareWorker } = await import('../scripts/trace-pool')
process.env.LENSFIELD_TRACE_WORKER = await prepareWorker()

// Imported after DATABASE_URL is set: these modules read it on first use.
const { useDb, usePool } = await import('../server/utils/db')
const schema = await import('../server/db/schema')
const { createRun } = await import('../server/runs/create')
const { startBatchWorker } = await import('../server/queue/worker')
const { stopBoss } = await import('../server/queue/boss')

const db = useDb()
const userId = `bench-${randomUUID()}`
await db.insert(schema.users).values({ id: userId, email: `${userId}@bench.example`, name: 'Bench', passwordHash: '-' })
const [team] = await db.insert(schema.teams).values({ slug: userId, name: 'Bench' }).returning()
await db.insert(schema.memberships).values({ teamId: team!.id, userId, role: 'lead' })
const [project] = await db.insert(schema.projects).values({ teamId: team!.id, name: 'Bench' }).returning()
const scenario = {
  emitter: { index: 1.7, angularProfile: 'isotropic', source: { shape: 'extended' } },
  reflector: { reflectance: 0.8, diffuseFraction: 0 },
  substrate: { index: 1.5, thicknessUm: 100, absorptionPerMm: 0 },
  lensArray: { lattice: 'hexagonal', pitchUm: 10, diameterUm: 10, sagUm: 3, shape: 'spherical', index: 1.5 },
  trace: { rays: raysPerCell, seed: 7, fresnel: 'averaged', maxEvents: 10_000 },
}
const [design] = await db.insert(schema.designs).values({ projectId: project!.id, name: 'Bench caps', scenario, authorId: userId }).returning()

const axes = [
  // Rc from 5.2 µm (just above D/2 at the largest fill factor) to 14 µm; fill factor 0.3 to 0.9.
  { parameter: 'lensArray.radiusOfCurvatureUm' as const, start: 5.2, stop: 14, steps },
  { parameter: 'lensArray.fillFactor' as const, start: 0.3, stop: 0.9, steps },
]

async function sweepOnce(threads: number) {
  const worker = await startBatchWorker({ threads })
  // Warm-up: one small run so the pool's threads have compiled the core before the clock starts.
  const warm = await createRun({
    kind: 'single', projectId: project!.id, teamId: team!.id, userId,
    design: { id: design!.id, name: design!.name, version: 1, scenario }, precision: { rays: 50_000 * threads },
  })
  await waitDone(warm.id)
  const t0 = performance.now()
  const run = await createRun({
    kind: 'sweep', projectId: project!.id, teamId: team!.id, userId, axes, figure: 'enhancement', seed: 3,
    design: { id: design!.id, name: design!.name, version: 1, scenario }, precision: { rays: raysPerCell },
  })
  const row = await waitDone(run.id)
  const seconds = (performance.now() - t0) / 1000
  await worker.stop()
  return { seconds, row }
}

async function waitDone(id: string) {
  for (;;) {
    const { rows: [r] } = await usePool().query(`SELECT status, cells_total, cells_finished, rays_done, best_cell_index FROM runs WHERE id = $1`, [id])
    if (r.status !== 'queued' && r.status !== 'running') return r
    await new Promise((res) => setTimeout(res, 100))
  }
}

const cells = steps * steps
console.log(`sweep through the queue: ${steps} × ${steps} (radius of curvature × fill factor), ${raysPerCell.toLocaleString('en-US')} rays per cell (flat companion by quadrature), batches of ${Number(process.env.LENSFIELD_BATCH_RAYS).toLocaleString('en-US')} rays`)
const results: Record<number, number> = {}
for (const threads of [...new Set([1, Math.min(2, availableParallelism())])]) {
  const { seconds, row } = await sweepOnce(threads)
  results[threads] = seconds
  const rays = Number(row.rays_done)
  console.log(`  ${threads} worker thread(s): ${seconds.toFixed(1).padStart(6)} s for ${cells} cells (${row.status}), ` +
    `${Math.round(rays / seconds).toLocaleString('en-US')} traced rays/s (companion rays too when a cell traces one), best cell ${row.best_cell_index}`)
}
if (results[2] && results[1]) console.log(`  2 threads vs 1: ×${(results[1] / results[2]).toFixed(2)} faster`)
await stopBoss()
await usePool().end()
process.exit(0)
