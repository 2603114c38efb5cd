// Puts the signed-in user and session (or null) on event.context for every API request.
import { loadSession } from '../utils/auth'

export default defineEventHandler(async (event) => {
  if (!event.path.startsWith('/api/')) return
  const { user, session } = await loadSession(event)
  event.context.user = user
  event.context.session = session
})
