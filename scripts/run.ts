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

/**
 * The static checks `npm test` runs first: `nuxi typecheck` (vue-tsc over app/, server/, shared/) and ESLint
 * (eslint.config.mjs; typecheck first, since it writes the .nuxt/eslint.config.mjs the lint config extends).
 * Returns the failed checks' names, each with the command to rerun it on its own.
 */
export function staticChecks(): string[] {
  const checks: Array<[name: string, cmd: string, args: string[], rerun: string]> = [
    ['type-check', bin('nuxi'), ['typecheck'], 'npm run typecheck'],
    ['lint', bin('eslint'), ['.'], 'npm run lint'],
  ]
  const failed: string[] = []
  for (const [name, cmd, args, rerun] of checks) {
    console.log(`[checks] ${name}: ${rerun}`)
    const r = spawnSync(cmd, args, { cwd: repoRoot, stdio: 'inherit' })
    if (r.status !== 0) failed.push(`${name} (rerun: ${rerun})`)
  }
  return failed
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
