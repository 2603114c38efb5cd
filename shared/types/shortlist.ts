// Shortlist contracts: bookmark a run cell with a note, choose one candidate (lead), discuss notes.
import { z } from 'zod'
import { INT4_MAX } from './limits'

const note = z.string().trim().max(2000, { error: 'note must be at most 2000 characters' })

export const shortlistAddSchema = z.object({
  runId: z.uuid({ error: 'runId must be a UUID' }),
  cellIndex: z.number({ error: 'cellIndex is required' }).int().min(0, { error: 'cellIndex must be 0 or more' })
    .max(INT4_MAX, { error: `cellIndex must be at most ${INT4_MAX}` }).default(0),
  note: note.default(''),
})

export const shortlistNoteSchema = z.object({ note })

export const shortlistChooseSchema = z.object({
  reason: z.string({ error: 'reason is required' }).trim().min(3, { error: 'reason must say in a few words why this candidate is chosen' }).max(2000, { error: 'reason must be at most 2000 characters' }),
  /** Required (true) when another entry holds the mark: moving it is confirmed, never silent. */
  replaceChosen: z.boolean({ error: 'replaceChosen must be true or false' }).default(false),
})

export const shortlistCommentSchema = z.object({
  body: z.string({ error: 'body is required' }).trim().min(1, { error: 'body must not be empty' }).max(1000, { error: 'body must be at most 1000 characters (comments are short)' }),
})
