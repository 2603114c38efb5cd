// The demo results traced at start-up: loading twice changes nothing, the rows read like a finished job (every
// cell done, the stored best is the best summary), the single run reproduces the engine's own trace with the same
// seed and rays, and the shortlist has one chosen candidate with a comment. Real Postgres, real engine.
import pg from 'pg'
import { randomBytes } from 'node:crypto'
import { afterAll, describe, expect, inject, it } from 'vitest'
import { createDatabase, migrateDatabase } from '../../scripts/postgres'
import { traceScenario } from '../../shared/optics'
import { scenarioSchema } from '../../shared/types/scenario'
import { dbFromPool } from '../../server/utils/db'
import { DEMO_DESIGNS, loadDemoData } from '../../server/utils/demo'
import { DEMO_RUN, DEMO_SHORTLIST, DEMO_SWEEP, loadDemoResults } from '../../server/utils/demo-results'

const adminUrl = inject('adminUrl')
const name = `lensfield_demo_results_${randomBytes(4).toString('hex')}`

afterAll(async () => {
  const admin = new pg.Client({ connectionString: adminUrl })
  await admin.connect()
  await admin.query(`DROP DATABASE IF EXISTS "${name}" WITH (FORCE)`)
  await admin.end()
})

describe('demo results', () => {
  it('load twice without changes; a finished run, a finished 6 × 6 sweep, a chosen candidate with a comment', async () => {
    const url = await createDatabase(adminUrl, name)
    await migrateDatabase(url)
    const pool = new pg.Pool({ connectionString: url, max: 2 })
    const q = async (sql: string, p: unknown[] = []) => (await pool.query(sql, p)).rows
    const snapshot = async () => ({
      runs: await q('SELECT * FROM runs ORDER BY name'),
      cells: await q('SELECT * FROM run_cells ORDER BY run_id, cell_index'),
      entries: await q('SELECT * FROM shortlist_entries'),
      comments: await q('SELECT * FROM shortlist_comments'),
      events: await q('SELECT * FROM shortlist_events ORDER BY action'),
    })
    try {
      await loadDemoData(dbFromPool(pool))
      const first = await loadDemoResults(dbFromPool(pool))
      const once = await snapshot()
      expect(await loadDemoResults(dbFromPool(pool))).toEqual(first)
      expect(await snapshot()).toEqual(once)

      expect(once.runs.map((r) => [r.name, r.status])).toEqual([[DEMO_RUN.name, 'done'], [DEMO_SWEEP.name, 'done']].sort())
      const sweep = once.runs.find((r) => r.name === DEMO_SWEEP.name)!
      const sweepCells = once.cells.filter((c) => c.run_id === sweep.id)
      expect(sweepCells).toHaveLength(36)
      expect(sweepCells.every((c) => c.status === 'done' && Number(c.rays_done) === DEMO_SWEEP.rays)).toBe(true)
      const best = sweepCells.reduce((a, b) => (b.summary.enhancement > a.summary.enhancement ? b : a))
      expect(sweep.best_cell_index).toBe(best.cell_index)

      // Same seed, same rays: the stored single run equals the engine's own trace (determinism rule).
      const single = once.runs.find((r) => r.name === DEMO_RUN.name)!
      const [cell] = once.cells.filter((c) => c.run_id === single.id)
      const design = DEMO_DESIGNS.find((d) => d.name === DEMO_RUN.design)!
      const direct = traceScenario(scenarioSchema.parse(design.scenario), { rays: DEMO_RUN.rays, seed: DEMO_RUN.seed })
      expect(cell!.summary.extraction).toBe(direct.extraction)
      expect(cell!.summary.enhancement).toBe(direct.enhancement)

      expect(once.entries).toHaveLength(1)
      expect(once.entries[0]).toMatchObject({ run_id: sweep.id, cell_index: best.cell_index, chosen: true, chosen_reason: DEMO_SHORTLIST.chosenReason })
      expect(once.comments.map((c) => c.body)).toEqual([DEMO_SHORTLIST.comment])
      expect(once.events.map((e) => e.action)).toEqual(['added', 'chosen', 'commented'])
    } finally {
      await pool.end()
    }
  })
})
