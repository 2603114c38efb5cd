// Mail captured by the fake SMTP server, newest first (demo/development mode only; 404 otherwise).
import { z } from 'zod'

const querySchema = z.object({ limit: z.coerce.number().int().min(1).max(500).default(100) })

export default defineApiHandler(async (event) => {
  requireMailboxMode(event)
  const { limit } = await getValidatedQuery(event, zodValidator(querySchema))
  return { messages: await listMailbox(limit) }
})
