import { idParamSchema } from '#shared/types/project'
import { jobSettings } from '~~/server/queue/config'

export default defineApiHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, zodValidator(idParamSchema))
  const { design, role } = await requireDesignRole(event, id, ANY_ROLE)
  // The team's queue limit in traced rays, so the run form can state the most rays a run of this design may ask
  // for (shared/types/ray-limits.ts) before the server would refuse it.
  return { design, role, teamRayLimit: jobSettings().teamRayLimit }
})
