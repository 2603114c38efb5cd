// Project and design bodies/params: the contract shared by pages and routes.
// A design's scenario is validated separately with scenarioSchema (shared/types/scenario.ts).
import { z } from 'zod'
import { stripBidiControls } from './limits'
import { lengthUm, ratio } from '../utils/geometry-format'

export const idParamSchema = z.object({ id: z.uuid({ error: 'id in the address must be a UUID' }) })

export const projectCreateSchema = z.object({
  teamId: z.uuid({ error: 'teamId must be the UUID of one of your teams' }),
  name: z.string({ error: 'name is required' }).overwrite(stripBidiControls).trim().min(1, { error: 'name must not be empty' }).max(120, { error: 'name must be at most 120 characters' }),
  description: z.string().trim().max(2000, { error: 'description must be at most 2000 characters' }).default(''),
})
export type ProjectCreateInput = z.infer<typeof projectCreateSchema>

/**
 * Fabrication limits a lead states for a project (what the mould or embossing line can make); every one optional.
 * Result pages mark sweep cells whose geometry breaks one. Lengths in µm; aspect ratio is sag / lens diameter.
 */
export const projectLimitsSchema = z.object({
  maxSagUm: z.number({ error: 'maxSagUm must be a number of µm' }).positive({ error: 'maxSagUm (largest sag) must be above 0 µm' }).max(1000, { error: 'maxSagUm must be at most 1000 µm' }).optional(),
  maxAspectRatio: z.number({ error: 'maxAspectRatio must be a number' }).positive({ error: 'maxAspectRatio (sag / diameter) must be above 0' }).max(0.5, { error: 'maxAspectRatio (sag / diameter) must be at most 0.5, a hemisphere' }).optional(),
  minGapUm: z.number({ error: 'minGapUm must be a number of µm' }).min(0, { error: 'minGapUm (smallest gap between lenses) must not be negative' }).max(1000, { error: 'minGapUm must be at most 1000 µm' }).optional(),
}).strict()
export type ProjectLimits = z.infer<typeof projectLimitsSchema>

export const projectPatchSchema = z.object({ limits: projectLimitsSchema.nullable() }).strict()

/** A lens geometry checked against the limits: one line per broken limit, in the trade's words. */
export function limitBreaches(lens: { sagUm: number; diameterUm: number; pitchUm: number } | null | undefined,
  limits: ProjectLimits | null | undefined): string[] {
  if (!lens || !limits) return []
  const out: string[] = []
  // As geometry is shown everywhere (0.01 µm, 3 significant digits); when the breach is finer than that, both sides
  // get 6 significant digits so the message never reads "2.00 µm > 2.00 µm".
  const pair = (v: number, lim: number, f: (x: number) => string, unit: string): [string, string] => {
    const a = f(v), b = f(lim)
    return a !== b ? [a, b] : [`${Number(v.toPrecision(6))}${unit}`, `${Number(lim.toPrecision(6))}${unit}`]
  }
  if (limits.maxSagUm !== undefined && lens.sagUm > limits.maxSagUm) {
    const [a, b] = pair(lens.sagUm, limits.maxSagUm, (x) => lengthUm(x), ' µm')
    out.push(`sag ${a} > ${b}`)
  }
  const aspect = lens.sagUm / lens.diameterUm
  if (limits.maxAspectRatio !== undefined && aspect > limits.maxAspectRatio) {
    const [a, b] = pair(aspect, limits.maxAspectRatio, ratio, '')
    out.push(`aspect ratio h/D ${a} > ${b}`)
  }
  // Gap along the lattice's nearest-neighbour direction (pitch − diameter), the narrowest land the tool must cut.
  const gap = lens.pitchUm - lens.diameterUm
  if (limits.minGapUm !== undefined && gap < limits.minGapUm) {
    const [a, b] = pair(gap, limits.minGapUm, (x) => lengthUm(x), ' µm')
    out.push(`gap ${a} < ${b}`)
  }
  return out
}

export const designNameSchema = z.string({ error: 'name is required' }).overwrite(stripBidiControls).trim()
  .min(1, { error: 'name must not be empty' }).max(120, { error: 'name must be at most 120 characters' })
