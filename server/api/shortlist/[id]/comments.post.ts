// A short comment on a shortlist note (any member).
import { idParamSchema } from '#shared/types/project'
import { shortlistCommentSchema } from '#shared/types/shortlist'

export default defineApiHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, zodValidator(idParamSchema))
  const { body } = await readValidatedBody(event, zodValidator(shortlistCommentSchema))
  const { entry, user } = await requireShortlistRole(event, id, ANY_ROLE)
  setResponseStatus(event, 201)
  return { comment: await addComment(useDb(), entry, user.id, body) }
})
