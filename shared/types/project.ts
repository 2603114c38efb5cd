// Project and design bodies/params: the contract shared by pages and routes.
// A design's scenario is validated separately with scenarioSchema (shared/types/scenario.ts).
import { z } from 'zod'
import { stripBidiControls } from './limits'

export const idParamSchema = z.object({ id: z.uuid({ error: 'id in the address must be a UUID' }) })

export const projectCreateSchema = z.object({
  teamId: z.uuid({ error: 'teamId must be the UUID of one of your teams' }),
  name: z.string({ error: 'name is required' }).overwrite(stripBidiControls).trim().min(1, { error: 'name must not be empty' }).max(120, { error: 'name must be at most 120 characters' }),
  description: z.string().trim().max(2000, { error: 'description must be at most 2000 characters' }).default(''),
})
export type ProjectCreateInput = z.infer<typeof projectCreateSchema>

export const designNameSchema = z.string({ error: 'name is required' }).overwrite(stripBidiControls).trim()
  .min(1, { error: 'name must not be empty' }).max(120, { error: 'name must be at most 120 characters' })
