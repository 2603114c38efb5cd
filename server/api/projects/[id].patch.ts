import { eq } from 'drizzle-orm'
import { projects } from '~~/server/db/schema'
import { idParamSchema, projectPatchSchema } from '#shared/types/project'

// Only the lead states the project's fabrication limits (null clears them).
export default defineApiHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, zodValidator(idParamSchema))
  await requireProjectRole(event, id, ['lead'], 'setting the project\'s fabrication limits')
  const body = await readValidatedBody(event, zodValidator(projectPatchSchema))
  const limits = body.limits && Object.keys(body.limits).length ? body.limits : null
  const [project] = await useDb().update(projects).set({ limits, updatedAt: new Date() }).where(eq(projects.id, id)).returning()
  return { project: project! }
})
