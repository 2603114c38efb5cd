// Small process helpers shared by scripts/start.ts, dev.ts and test.ts.
import { spawn, spawnSync, type ChildProcess } from 'node:child_process'
import { join } from 'node:path'
import { repoRoot } from './postgres'

export const bin = (name: string) => join(repoRoot, 'node_modules', '.bin', name)

/** Runs a command to completion with inherited output; throws when it fails. */
export function runOrThrow(cmd: string, args: string[], env: NodeJS.ProcessEnv = process.env) {
  const r = spawnSync(cmd, args, { cwd: repoRoot, stdio: 'inherit', env })
  if (r.status !== 0) throw new Error(`${[cmd, ...args].join(' ')} failed (exit ${r.status ?? r.signal})`)
}

/** The production build (`nuxt build` → .output/), unless LENSFIELD_SKIP_BUILD=1 and a build exists. */
export function buildApp() {
  if (process.env.LENSFIELD_SKIP_BUILD === '1') {
    console.log('[build] LENSFIELD_SKIP_BUILD=1: using the existing .output/')
    return
  }
  runOrThrow(bin('nuxt'), ['build'])
}

/** Starts a long-running child; the parent's exit hooks kill it. */
export function startChild(cmd: string, args: string[], env: NodeJS.ProcessEnv): ChildProcess {
  return spawn(cmd, args, { cwd: repoRoot, stdio: 'inherit', env })
}

/** Polls url until it answers 2xx or timeoutMs passes. */
export async function waitForHttp(url: string, timeoutMs = 60_000): Promise<void> {
  const deadline = Date.now() + timeoutMs
  let lastError = ''
  while (Date.now() < deadline) {
    try {
      const res = await fetch(url)
      if (res.ok) return
      lastError = `HTTP ${res.status}`
    } catch (err) {
      lastError = (err as Error).message
    }
    await new Promise((r) => setTimeout(r, 250))
  }
  throw new Error(`${url} did not answer within ${timeoutMs / 1000} s (${lastError})`)
}
