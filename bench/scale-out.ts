// npm run bench:scaleout: the queue as the distributed engine. On a throwaway PostgreSQL the same 10 × 10 sweep
// (bench/throwaway-server.ts: radius of curvature × fill factor, hexagonal caps, 200 000 rays per cell, one batch a
// cell) is queued and traced by `npm run worker` processes (scripts/worker.ts, spawned here, 1 thread each):
//   1. wall throughput of 2 processes vs 1 (target ≥ 1.8×);
//   2. what the queue carries: the same grid in tiny batches (1 000 rays), jobs/s, the queue's share of the threads'
//      time, the connections a worker holds and PostgreSQL's CPU per job, and the batch size that keeps queue
//      overhead under 5 % of trace time;
//   3. today's sweep (flat companion by quadrature, no companion rays) vs the same sweep with the companion traced
//      beside every cell, as before 2026-12-02 (in-process batch worker, 1 thread each; target ≥ 1.2× faster).
// Prints the load average around every phase: the machine is shared, so say how loaded it was.
// Usage: npm run bench:scaleout -- [--rays-per-cell N] [--steps N] [--tiny-rays N] [--tiny-batch N] [--rounds N]
//        [--skip scaleout,tiny,companion]
import { spawn, type ChildProcess } from 'node:child_process'
import { loadavg } from 'node:os'
import { parseArgs } from 'node:util'
import { repoRoot } from '../scripts/postgres'
import { batchRaysForOverhead, fleetSizing, queueOverhead, type QueueOverhead } from './queue-sizing'
import { benchSweepAxes, benchSweepScenario, postgresCpuSeconds, startBenchQueue, type RunRow } from './throwaway-server'

const { values } = parseArgs({ options: {
  'rays-per-cell': { type: 'string' }, steps: { type: 'string' }, 'tiny-rays': { type: 'string' },
  'tiny-batch': { type: 'string' }, rounds: { type: 'string' }, skip: { type: 'string' }, prefetch: { type: 'string' },
}, strict: true })
const raysPerCell = Number(values['rays-per-cell'] ?? 200_000)
const steps = Number(values.steps ?? 10)
const tinyBatch = Number(values['tiny-batch'] ?? 1000)
const tinyRays = Number(values['tiny-rays'] ?? 10 * tinyBatch)
const rounds = Number(values.rounds ?? 1)
const skip = new Set((values.skip ?? '').split(',').filter(Boolean))
/** Worker prefetch settings to measure (LENSFIELD_WORKER_PREFETCH); the companion comparison uses the last. */
const prefetches = (values.prefetch ?? '0,1').split(',').map(Number)
if (prefetches.some((p) => !Number.isInteger(p) || p < 0)) throw new Error(`--prefetch: whole numbers ≥ 0, got ${values.prefetch}`)
for (const [k, v] of Object.entries({ raysPerCell, steps, tinyBatch, tinyRays, rounds })) {
  if (!Number.isInteger(v) || v < 1) throw new Error(`--${k}: a whole number ≥ 1 is needed, got ${v}`)
}

const load = () => loadavg().map((x) => x.toFixed(2)).join(' ')
const fmt = (n: number) => Math.round(n).toLocaleString('en-US')
const axes = benchSweepAxes(steps)
const cells = steps * steps
const q = await startBenchQueue('lensfield_scaleout', benchSweepScenario(raysPerCell))
console.log(`scale-out bench: ${steps} × ${steps} sweep, ${fmt(raysPerCell)} rays a cell in batches of ${fmt(raysPerCell)}; `
  + `tiny batches: ${fmt(tinyRays)} rays a cell in batches of ${fmt(tinyBatch)}; load average before ${load()} (2 cores, shared)`)

// ---- worker processes --------------------------------------------------------------------------------------------
const children = new Set<ChildProcess>()
process.on('exit', () => { for (const c of children) c.kill('SIGKILL') })

function startWorkerProcess(prefetch: number): Promise<ChildProcess> {
  const child = spawn(process.execPath, ['--import', 'tsx', 'scripts/worker.ts', '--threads', '1', '--prefetch', String(prefetch)], {
    cwd: repoRoot, env: { ...process.env, LENSFIELD_WORKER_THREADS: '1' }, stdio: ['ignore', 'pipe', 'inherit'],
  })
  children.add(child)
  return new Promise((resolve, reject) => {
    let out = ''
    const timer = setTimeout(() => reject(new Error(`worker ${child.pid} did not start within 120 s: ${out}`)), 120_000)
    child.stdout!.on('data', (d: Buffer) => {
      out += d.toString()
      if (out.includes('tracing on')) { clearTimeout(timer); resolve(child) }
    })
    child.on('exit', (code) => { clearTimeout(timer); children.delete(child); reject(new Error(`worker exited (${code}) before it was ready: ${out}`)) })
  })
}

async function stopWorkerProcess(child: ChildProcess) {
  if (child.exitCode !== null) return
  const exited = new Promise((r) => child.once('exit', r))
  child.kill('SIGTERM')
  await exited
  children.delete(child)
}

interface Timed { seconds: number; row: RunRow; pgCpu: number | null; peakConnections: Record<string, number> }

/** Times one run from "created" to "done", sampling connections and PostgreSQL CPU around it. */
function timed(create: () => Promise<string>): Promise<Timed> {
  return timedMany([create])
}

/** The same for runs created together (one after another, then awaited together); their rows are summed. */
async function timedMany(creates: Array<() => Promise<string>>): Promise<Timed> {
  const peak: Record<string, number> = {}
  let sampling = true
  const sampler = (async () => {
    while (sampling) {
      const now = await q.connections()
      for (const [k, v] of Object.entries(now)) peak[k] = Math.max(peak[k] ?? 0, v)
      await new Promise((r) => setTimeout(r, 250))
    }
  })()
  const cpu0 = postgresCpuSeconds(q.dataDir)
  const t0 = performance.now()
  const ids: string[] = []
  for (const create of creates) ids.push(await create())
  const rows = await Promise.all(ids.map((id) => q.waitDone(id)))
  const seconds = (performance.now() - t0) / 1000
  const cpu1 = postgresCpuSeconds(q.dataDir)
  sampling = false
  await sampler
  for (const [i, r] of rows.entries()) if (r.status !== 'done') throw new Error(`run ${ids[i]} ended ${r.status}`)
  const row = rows.reduce((a, b) => ({
    ...a, cellsTotal: a.cellsTotal + b.cellsTotal, cellsFinished: a.cellsFinished + b.cellsFinished, raysDone: a.raysDone + b.raysDone,
    batches: a.batches + b.batches, computeSeconds: a.computeSeconds + b.computeSeconds,
  }))
  return { seconds, row, pgCpu: cpu0 !== null && cpu1 !== null ? cpu1 - cpu0 : null, peakConnections: peak }
}

const bigSweep = () => q.createRun({ kind: 'sweep', rays: raysPerCell, batchRays: raysPerCell, axes, figure: 'enhancement', seed: 3 })
const tinySweep = () => q.createRun({ kind: 'sweep', rays: tinyRays, batchRays: tinyBatch, axes, figure: 'enhancement', seed: 5 })
const measure = (t: Timed, threads: number): QueueOverhead => queueOverhead({
  wallSeconds: t.seconds, threads, computeSeconds: t.row.computeSeconds, jobs: t.row.batches, rays: t.row.raysDone,
})

/**
 * The queue's share of the threads' time. With prefetch a batch's compute_ms also holds its wait on the pool behind
 * the batch before it, so the share is not measured then (compare the wall times instead).
 */
const share = (o: QueueOverhead, prefetch: number) => prefetch > 0
  ? 'queue share not measured with prefetch'
  : `queue share ${(100 * o.fraction).toFixed(1)} %, ${(o.perJobSeconds * 1000).toFixed(1)} ms of thread time a job`

interface ProcessSet { processes: number; prefetch: number; big: Timed[]; tiny: Timed[]; tinyTwoRuns: Timed[] }
const results: ProcessSet[] = []
// The bench process's own connections (its pool and its queue client, which enqueues), before any worker starts.
await (await import('../server/queue/boss')).useBoss()
const baseline = await q.connections()

async function withProcesses(rec: ProcessSet) {
  const n = rec.processes
  const procs = await Promise.all(Array.from({ length: n }, () => startWorkerProcess(rec.prefetch)))
  try {
    // Warm-up: a run of 4 batches per process, so every process has compiled the core before the clock starts.
    const warm = await q.createRun({ kind: 'single', rays: 100_000 * n, batchRays: 25_000 })
    await q.waitDone(warm)
    if (!skip.has('scaleout')) {
      const l0 = load()
      const t = await timed(bigSweep)
      rec.big.push(t)
      const o = measure(t, n)
      console.log(`  ${n} process(es) × 1 thread, prefetch ${rec.prefetch}: ${t.seconds.toFixed(2).padStart(6)} s for ${cells} cells, ${fmt(t.row.raysDone / t.seconds)} rays/s, `
        + `${share(o, rec.prefetch)}, best cell ${t.row.bestCellIndex} (load ${l0} → ${load()})`)
    }
    if (!skip.has('tiny')) {
      const l0 = load()
      const t = await timed(tinySweep)
      rec.tiny.push(t)
      const o = measure(t, n)
      console.log(`  ${n} process(es), prefetch ${rec.prefetch}, tiny batches: ${t.row.batches} jobs in ${t.seconds.toFixed(2)} s = ${o.jobsPerSecond.toFixed(1)} jobs/s, `
        + `${share(o, rec.prefetch)}, `
        + `PostgreSQL ${t.pgCpu === null ? '?' : `${(1000 * t.pgCpu / t.row.batches).toFixed(2)} ms CPU a job`} (load ${l0} → ${load()})`)
      if (n > 1) {
        // Commits of one run take its row lock in turn; two runs at once show what the queue carries across runs.
        const l1 = load()
        const t2 = await timedMany([tinySweep, tinySweep])
        rec.tinyTwoRuns.push(t2)
        const o2 = measure(t2, n)
        console.log(`  ${n} process(es), tiny batches, 2 sweeps at once: ${t2.row.batches} jobs in ${t2.seconds.toFixed(2)} s = `
          + `${o2.jobsPerSecond.toFixed(1)} jobs/s, queue share ${(100 * o2.fraction).toFixed(1)} % (load ${l1} → ${load()})`)
      }
    }
  } finally {
    for (const p of procs) await stopWorkerProcess(p)
  }
}

if (!skip.has('scaleout') || !skip.has('tiny')) {
  console.log('worker processes (npm run worker -- --threads 1), interleaved by round:')
  for (let r = 0; r < rounds; r++) {
    for (const prefetch of prefetches) {
      for (const n of [1, 2]) {
        let rec = results.find((x) => x.processes === n && x.prefetch === prefetch)
        if (!rec) results.push((rec = { processes: n, prefetch, big: [], tiny: [], tinyTwoRuns: [] }))
        await withProcesses(rec)
      }
    }
  }
}

// ---- today's sweep vs the traced companion -----------------------------------------------------------------------
const companion: Record<'quadrature' | 'traced', Timed[]> = { quadrature: [], traced: [] }
if (!skip.has('companion')) {
  const { startBatchWorker } = await import('../server/queue/worker')
  console.log(`flat companion, in-process batch worker of 1 thread, prefetch ${prefetches.at(-1)}, interleaved by round:`)
  for (let r = 0; r < rounds; r++) {
    for (const method of ['quadrature', 'traced'] as const) {
      const worker = await startBatchWorker({ threads: 1, prefetch: prefetches.at(-1), companion: method })
      try {
        await q.waitDone(await q.createRun({ kind: 'single', rays: 100_000, batchRays: 25_000 }))
        const l0 = load()
        const t = await timed(bigSweep)
        companion[method].push(t)
        const o = measure(t, 1)
        console.log(`  companion ${method.padEnd(10)}: ${t.seconds.toFixed(2).padStart(6)} s for ${cells} cells, `
          + `${fmt(t.row.raysDone / t.seconds)} device rays/s, ${share(o, prefetches.at(-1)!)}, `
          + `best cell ${t.row.bestCellIndex} (load ${l0} → ${load()})`)
      } finally {
        await worker.stop()
      }
    }
  }
}

// ---- summary -----------------------------------------------------------------------------------------------------
const median = (xs: number[]) => { const s = [...xs].sort((a, b) => a - b); const m = s.length >> 1; return s.length % 2 ? s[m]! : (s[m - 1]! + s[m]!) / 2 }
const spread = (xs: number[]) => xs.length > 1 ? ` (rounds ${xs.map((x) => x.toFixed(2)).join(', ')})` : ''
console.log(`summary (load average now ${load()}):`)
let perJob: number | null = null
let perRay: number | null = null
for (const prefetch of prefetches) {
  const one = results.find((x) => x.processes === 1 && x.prefetch === prefetch)
  const two = results.find((x) => x.processes === 2 && x.prefetch === prefetch)
  const tag = `prefetch ${prefetch}`
  if (one?.big.length && two?.big.length) {
    const ratios = one.big.map((t, i) => t.seconds / two.big[i]!.seconds)
    console.log(`  ${tag}: scale-out, 2 processes vs 1 (1 thread each): ×${median(ratios).toFixed(2)} wall throughput${spread(ratios)} (target ≥ 1.8); `
      + `1 process ${median(one.big.map((t) => t.seconds)).toFixed(2)} s, 2 processes ${median(two.big.map((t) => t.seconds)).toFixed(2)} s`)
  }
  if (one?.tiny.length) {
    const o = one.tiny.map((t) => measure(t, 1))
    const pj = median(o.map((x) => x.perJobSeconds))
    if (prefetch === 0) perJob = pj
    console.log(`  ${tag}: queue, 1 process: ${median(o.map((x) => x.jobsPerSecond)).toFixed(1)} jobs/s`
      + `${prefetch === 0 ? `; ${(pj * 1000).toFixed(1)} ms of queue time a job on a thread` : ''}`)
  }
  if (two?.tiny.length) {
    const o = two.tiny.map((t) => measure(t, 2))
    console.log(`  ${tag}: queue, 2 processes: ${median(o.map((x) => x.jobsPerSecond)).toFixed(1)} jobs/s on one PostgreSQL (same 2 cores as the workers), one sweep`)
    if (two.tinyTwoRuns.length) {
      const o2 = two.tinyTwoRuns.map((t) => measure(t, 2))
      console.log(`  ${tag}: queue, 2 processes, 2 sweeps at once: ${median(o2.map((x) => x.jobsPerSecond)).toFixed(1)} jobs/s`)
    }
    const cpu = two.tiny.map((t) => t.pgCpu).filter((x): x is number => x !== null)
    if (cpu.length) console.log(`  ${tag}: PostgreSQL CPU ${(1000 * median(cpu.map((c, i) => c / two.tiny[i]!.row.batches))).toFixed(2)} ms a job (live backends)`)
  }
}
const allBig = results.flatMap((r) => r.processes === 1 && r.prefetch === 0 ? r.big : [])
if (allBig.length) perRay = median(allBig.map((t) => t.row.computeSeconds / t.row.raysDone))
if (perJob !== null && perRay !== null) {
  console.log(`  trace time ${(perRay * 1e6).toFixed(3)} µs a ray on one thread; without prefetch, batch for queue time < 5 % of trace time: `
    + `≥ ${fmt(batchRaysForOverhead(perJob, perRay, 0.05))} rays (today's default 200 000: ${(100 * perJob / (200_000 * perRay)).toFixed(2)} %)`)
}
const procs = results.flatMap((r) => r.big.concat(r.tiny).map((t) => ({ n: r.processes, t })))
if (procs.length) {
  const per = (t: Timed, n: number) => {
    const extra = Object.entries(t.peakConnections).reduce((s, [k, v]) => s + Math.max(0, v - (baseline[k] ?? 0)), 0)
    return extra / n
  }
  const two = results.find((x) => x.processes === 2)
  const byApp = (two?.tiny[0] ?? two?.big[0])?.peakConnections
  console.log(`  connections a worker process holds (peak over the runs): ${Math.max(...procs.map(({ n, t }) => per(t, n))).toFixed(1)}`
    + `${byApp ? `; peak by application with 2 workers ${JSON.stringify(byApp)}, before the workers ${JSON.stringify(baseline)}` : ''}`)
}
// The README's sized example, from this run's figures: 100 machines of 8 cores (7 tracing threads, prefetch 1), the
// fleet's job rate held to half of the jobs/s measured here on one PostgreSQL, idle polling every 5 s.
const zero1 = results.find((x) => x.processes === 1 && x.prefetch === 0)
const zero2 = results.find((x) => x.processes === 2 && x.prefetch === 0)
if (perRay !== null && zero1?.tiny.length) {
  const measuredJobs = median(zero1.tiny.map((t) => measure(t, 1).jobsPerSecond))
  const cpus = (zero2?.tiny ?? zero1.tiny).map((t) => (t.pgCpu ?? 0) / t.row.batches)
  const machines = 100, threadsPerMachine = 7, prefetch = 1
  // Connections of one process: its queue client (pg-boss pool, measured), one LISTEN, and the app pool, which holds
  // about one connection per subscription in a commit plus one (capped at its max of 10).
  const queueConns = Math.max(1, ...results.flatMap((r) => r.big.concat(r.tiny)).map((t) => ((t.peakConnections['lensfield-queue'] ?? 0)
    - (baseline['lensfield-queue'] ?? 0))))
  const perProcess = Math.min(4, queueConns) + 1 + Math.min(10, 1 + threadsPerMachine + prefetch)
  const batchRays = Math.ceil(machines * threadsPerMachine / (0.5 * measuredJobs * perRay) / 1e6) * 1e6
  const f = fleetSizing({
    machines, threadsPerMachine, batchRays, secondsPerRay: perRay, connectionsPerProcess: perProcess,
    databaseCpuSecondsPerJob: median(cpus), pollingSeconds: 5, reservedConnections: 50,
  })
  console.log(`  fleet example (${machines} machines × ${threadsPerMachine} threads, prefetch ${prefetch}, job rate ≤ half of ${measuredJobs.toFixed(0)} jobs/s): `
    + `batches of ${fmt(batchRays)} rays (${f.batchSeconds.toFixed(1)} s a batch), ${f.jobsPerSecond.toFixed(1)} jobs/s, ${(f.raysPerSecond / 1e6).toFixed(0)} M rays/s; `
    + `${perProcess} connections a machine → ${f.connections} (max_connections ${f.maxConnections}); idle polls ${f.idlePollsPerSecond.toFixed(0)}/s at 5 s; `
    + `PostgreSQL ${f.databaseCores.toFixed(2)} cores of job work; events a batch ≈ ${fmt(batchRays * 7.6)} at 7.6 a ray`)
}
if (companion.quadrature.length && companion.traced.length) {
  const ratios = companion.quadrature.map((t, i) => companion.traced[i]!.seconds / t.seconds)
  console.log(`  sweep ${steps} × ${steps} at ${fmt(raysPerCell)} rays a cell: companion traced ${median(companion.traced.map((t) => t.seconds)).toFixed(2)} s, `
    + `by quadrature ${median(companion.quadrature.map((t) => t.seconds)).toFixed(2)} s: ×${median(ratios).toFixed(2)} faster${spread(ratios)} (target ≥ 1.2)`)
}
await q.close()
process.exit(0)
