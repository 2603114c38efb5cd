// Only a lead marks the candidate for fabrication, with a reason. Moving the mark from another entry needs
// replaceChosen: true (409 naming the current choice otherwise); the previous choice then loses its mark.
import { idParamSchema } from '#shared/types/project'
import { shortlistChooseSchema } from '#shared/types/shortlist'

export default defineApiHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, zodValidator(idParamSchema))
  const { reason, replaceChosen } = await readValidatedBody(event, zodValidator(shortlistChooseSchema))
  const { entry, user } = await requireShortlistRole(event, id, ['lead'], 'choosing the candidate')
  return { entry: await chooseEntry(useDb(), entry, user.id, reason, replaceChosen) }
})
