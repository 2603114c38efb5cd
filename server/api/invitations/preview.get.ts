// What an invitation link offers (team, role, e-mail), for the page the link opens; 404/410 when it cannot be used.
import { z } from 'zod'
import { linkTokenSchema } from '#shared/types/team'

export default defineApiHandler(async (event) => {
  const { token } = await getValidatedQuery(event, zodValidator(z.object({ token: linkTokenSchema })))
  return { invitation: await describeInvitation(useDb(), token) }
})
