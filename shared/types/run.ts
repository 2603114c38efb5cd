// Query and route parameters of the run and sweep routes (the bodies live in ./sweep).
import { z } from 'zod'
import { INT4_MAX } from './limits'

export const runListQuerySchema = z.object({
  projectId: z.uuid({ error: 'projectId must be the UUID of one of your projects' }),
  kind: z.enum(['single', 'sweep']).optional(),
})

export const cellParamSchema = z.object({
  id: z.uuid({ error: 'id in the address must be a UUID' }),
  index: z.coerce.number({ error: 'cell index must be a whole number' }).int().min(0, { error: 'cell index must be 0 or more' })
    .max(INT4_MAX, { error: `cell index must be at most ${INT4_MAX}` }),
})
