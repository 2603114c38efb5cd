// Only a lead marks the candidate for fabrication, with a reason; a previous choice loses its mark.
import { idParamSchema } from '../../../../shared/types/project'
import { shortlistChooseSchema } from '../../../../shared/types/shortlist'

export default defineApiHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, zodValidator(idParamSchema))
  const { reason } = await readValidatedBody(event, zodValidator(shortlistChooseSchema))
  const { entry, user } = await requireShortlistRole(event, id, ['lead'], 'choosing the candidate')
  return { entry: await chooseEntry(useDb(), entry, user.id, reason) }
})
