// Real worker processes for the api tests: `scripts/worker.ts` run with tsx against the test database, exactly as
// `npm run worker` runs it on another machine. Its output goes to test-output/ for diagnosis.
import { spawn, type ChildProcess } from 'node:child_process'
import { createWriteStream, mkdirSync } from 'node:fs'
import { join } from 'node:path'
import { inject } from 'vitest'
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
