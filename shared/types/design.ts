// Design bodies: a design is a named scenario (shared/types/scenario.ts) saved in a project.
import { z } from 'zod'
import { INT4_MAX } from './limits'
import { scenarioWithRefsSchema } from './table-refs'
import { designNameSchema } from './project'

export const designCreateSchema = z.object({
  name: designNameSchema,
  /** The scenario; its spectrum and indices may be `{ tableId }` references to the team's uploaded tables. */
  scenario: scenarioWithRefsSchema,
})
export type DesignCreateInput = z.infer<typeof designCreateSchema>

export const designUpdateSchema = z.object({
  name: designNameSchema.optional(),
  scenario: scenarioWithRefsSchema.optional(),
  /** The version the change was made on; a newer stored version makes the save fail with 409. */
  baseVersion: z.number({ error: 'baseVersion must be a whole number' }).int({ error: 'baseVersion must be a whole number' }).min(1)
    .max(INT4_MAX, { error: `baseVersion must be at most ${INT4_MAX}` }).optional(),
}).refine((b) => b.name !== undefined || b.scenario !== undefined, { error: 'send name and/or scenario to change' })
export type DesignUpdateInput = z.infer<typeof designUpdateSchema>
