// Mail captured by the fake SMTP server, newest first (demo/development mode only; 404 otherwise): signed in
// only, and only mail addressed to the user (a lead also sees their teams' mail; server/utils/mailbox.ts).
import { z } from 'zod'

const querySchema = z.object({ limit: z.coerce.number().int().min(1).max(500).default(100) })

export default defineApiHandler(async (event) => {
  requireMailboxMode(event)
  const user = requireUser(event)
  const { limit } = await getValidatedQuery(event, zodValidator(querySchema))
  return { messages: await listMailbox(await mailboxAddressesOf(user), limit) }
})
