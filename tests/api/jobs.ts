// Helpers of the job-system tests: real worker processes (`scripts/worker.ts` under tsx's loader against the test
// database, exactly as `npm run worker` runs it on another machine; output in test-output/), polling, and a fresh
// team with a project and a design.
import { spawn, type ChildProcess } from 'node:child_process'
import { createWriteStream, mkdirSync } from 'node:fs'
import { join } from 'node:path'
import type pg from 'pg'
import { expect, inject } from 'vitest'
import { signedUpClient, validScenario } from './client'
import { repoRoot } from '../../scripts/postgres'

let counter = 0

export interface WorkerProcess {
  child: ChildProcess
  /** Resolves once the worker printed that it is tracing. */
  ready: Promise<void>
  kill(signal?: NodeJS.Signals): Promise<void>
}

export function startWorkerProcess(threads = 1): WorkerProcess {
  counter += 1
  const logDir = join(repoRoot, 'test-output')
  mkdirSync(logDir, { recursive: true })
  const log = createWriteStream(join(logDir, `worker-${process.pid}-${counter}.log`))
  // node itself with tsx's loader (not the tsx wrapper), so the pid is the worker's and a signal reaches it directly.
  const child = spawn(process.execPath, ['--import', 'tsx', 'scripts/worker.ts', '--threads', String(threads)], {
    cwd: repoRoot,
    env: { ...process.env, DATABASE_URL: inject('databaseUrl'), LENSFIELD_QUEUE_MAINTENANCE_SECONDS: '1' },
    stdio: ['ignore', 'pipe', 'pipe'],
  })
  child.stdout!.pipe(log)
  child.stderr!.pipe(log)
  const ready = new Promise<void>((resolve, reject) => {
    child.stdout!.on('data', (d: Buffer) => { if (d.toString().includes('tracing on')) resolve() })
    child.once('exit', (code, sig) => reject(new Error(`worker exited before it was ready (${code ?? sig})`)))
  })
  return {
    child,
    ready,
    async kill(signal: NodeJS.Signals = 'SIGTERM') {
      if (child.exitCode !== null || child.signalCode !== null) return
      const exited = new Promise((r) => child.once('exit', r))
      child.kill(signal)
      await Promise.race([exited, new Promise((r) => setTimeout(r, 15_000))])
      if (child.exitCode === null && child.signalCode === null) child.kill('SIGKILL')
    },
  }
}

/** Polls `check` every 200 ms until it returns a truthy value or timeoutMs passes. */
export async function waitFor<T>(what: string, check: () => Promise<T | null | undefined | false>, timeoutMs = 90_000): Promise<T> {
  const deadline = Date.now() + timeoutMs
  while (Date.now() < deadline) {
    const v = await check()
    if (v) return v
    await new Promise((r) => setTimeout(r, 200))
  }
  throw new Error(`timed out after ${timeoutMs / 1000} s waiting for ${what}`)
}

export async function teamWithDesign(tag: string, scenario: unknown = { ...validScenario, trace: { ...validScenario.trace, rays: 60_000, seed: 11 } }) {
  const owner = await signedUpClient(tag)
  const project = await owner.client.post('/api/projects', { teamId: owner.teamId, name: `Runs ${tag}` })
  expect(project.status).toBe(201)
  const design = await owner.client.post(`/api/projects/${project.body.project.id}/designs`, { name: `Caps ${tag}`, scenario })
  expect(design.status).toBe(201)
  return { ...owner, projectId: project.body.project.id as string, design: design.body.design as { id: string; scenario: unknown } }
}

export async function waitForRunEnd(pool: pg.Pool, id: string, timeoutMs = 120_000) {
  return waitFor(`run ${id} to end`, async () => {
    const r = (await pool.query('SELECT * FROM runs WHERE id = $1', [id]).catch(() => ({ rows: [] as any[] }))).rows[0]
    return r && !['queued', 'running'].includes(r.status) ? r : null
  }, timeoutMs)
}

/** Freezes the worker the moment it holds an unfinished batch of the run, then kills it (SIGKILL). Returns the batch. */
export async function killMidBatch(pool: pg.Pool, w: WorkerProcess, runId: string) {
  const inFlight = async () => (await pool.query(
    `SELECT b.cell_id, b.batch_index FROM run_batches b JOIN run_cells c ON c.id = b.cell_id
     WHERE c.run_id = $1 AND b.status = 'queued' AND b.attempts > 0 AND b.worker LIKE $2`, [runId, `%:${w.child.pid}`])).rows[0]
  // Frozen first (SIGSTOP), so the batch cannot land between the look and the kill.
  const victim = await waitFor('the worker to be tracing a batch', async () => {
    if (!(await inFlight())) return null
    w.child.kill('SIGSTOP')
    const still = await inFlight()
    if (!still) w.child.kill('SIGCONT')
    return still
  })
  await w.kill('SIGKILL')
  return victim as { cell_id: string; batch_index: number }
}
