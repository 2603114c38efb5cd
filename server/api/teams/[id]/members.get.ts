import { asc, eq } from 'drizzle-orm'
import { memberships, users } from '~~/server/db/schema'
import { idParamSchema } from '#shared/types/project'

export default defineApiHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, zodValidator(idParamSchema))
  await requireTeamRole(event, id, ANY_ROLE)
  const members = await useDb().select({ id: users.id, name: users.name, email: users.email, role: memberships.role, since: memberships.createdAt })
    .from(memberships).innerJoin(users, eq(users.id, memberships.userId)).where(eq(memberships.teamId, id)).orderBy(asc(users.name))
  return { members }
})
