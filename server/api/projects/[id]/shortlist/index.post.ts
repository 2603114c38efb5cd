// Any member bookmarks a run cell into the shortlist with a note.
import { idParamSchema } from '#shared/types/project'
import { shortlistAddSchema } from '#shared/types/shortlist'

export default defineApiHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, zodValidator(idParamSchema))
  const body = await readValidatedBody(event, zodValidator(shortlistAddSchema))
  const { user } = await requireProjectRole(event, id, ANY_ROLE)
  const entry = await addToShortlist(useDb(), id, user.id, body)
  setResponseStatus(event, 201)
  return { entry }
})
