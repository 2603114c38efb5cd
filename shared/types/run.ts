// Query and route parameters of the run and sweep routes (the bodies live in ./sweep).
import { z } from 'zod'
import { INT4_MAX, stripBidiControls } from './limits'

export const runListQuerySchema = z.object({
  projectId: z.uuid({ error: 'projectId must be the UUID of one of your projects' }),
  kind: z.enum(['single', 'sweep']).optional(),
})

export const cellParamSchema = z.object({
  id: z.uuid({ error: 'id in the address must be a UUID' }),
  index: z.coerce.number({ error: 'cell index must be a whole number' }).int().min(0, { error: 'cell index must be 0 or more' })
    .max(INT4_MAX, { error: `cell index must be at most ${INT4_MAX}` }),
})

/** A run's or sweep's name, as given at start or by a rename (bidi controls stripped, like other names). */
export const runNameSchema = z.string({ error: 'name is required' }).overwrite(stripBidiControls).trim()
  .min(1, { error: 'name must not be empty' }).max(120, { error: 'name must be at most 120 characters' })

/** PATCH /api/runs/:id and /api/sweeps/:id. */
export const runPatchSchema = z.object({ name: runNameSchema }).strict()

/** "2 Dec 15:40" in the given time zone (UTC when none). */
export function runNameTime(at: Date, timeZone = 'UTC'): string {
  const parts = new Intl.DateTimeFormat('en-GB', { day: 'numeric', month: 'short', hour: '2-digit', minute: '2-digit', hourCycle: 'h23', timeZone })
    .formatToParts(at)
  const get = (t: string) => parts.find((p) => p.type === t)?.value ?? ''
  return `${get('day')} ${get('month')} ${get('hour')}:${get('minute')}`
}

/**
 * The name a run or sweep gets when none is given: a sweep's axes ("Sag × Fill factor, 2 Dec 15:40"), a single run's
 * design ("Film A, 2 Dec 15:40"). The server names in UTC and says so; the start panel proposes the reader's time.
 */
export function defaultRunName(input: { kind: 'single' | 'sweep'; designName: string; axisLabels: string[]; at: Date; timeZone?: string }): string {
  const what = input.kind === 'sweep' && input.axisLabels.length ? input.axisLabels.join(' × ') : input.designName
  const when = runNameTime(input.at, input.timeZone)
  const name = `${what}, ${when}${input.timeZone ? '' : ' UTC'}`
  return name.length <= 120 ? name : `${what.slice(0, 120 - when.length - 7)}…, ${when}${input.timeZone ? '' : ' UTC'}`
}
