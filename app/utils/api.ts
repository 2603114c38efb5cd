// The JSON the API answers, as Nitro infers it from each route handler (.nuxt/types/nitro-routes.d.ts), for the
// places where useFetch cannot infer it itself: a URL built from a prop (runs/… or sweeps/…), or a prop passed on.
import type { InternalApi } from 'nitropack/types'

/** The answer of GET on route R ('/api/runs/:id', …). */
export type ApiGet<R extends keyof InternalApi> = InternalApi[R] extends { get: infer T } ? T : never

/** GET /api/runs/:id (and /api/sweeps/:id, the same handler): the run, the reader's role, progress, cells. */
export type RunAnswer = ApiGet<'/api/runs/:id'>
/** A run row as the API sends it. */
export type RunRow = RunAnswer['run']
/** GET /api/runs/:id/cells/:index: one cell and its full result (null while nothing is counted). */
export type CellAnswer = ApiGet<'/api/runs/:id/cells/:index'>
