// Edits the note (its author or a lead).
import { idParamSchema } from '#shared/types/project'
import { shortlistNoteSchema } from '#shared/types/shortlist'

export default defineApiHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, zodValidator(idParamSchema))
  const { note } = await readValidatedBody(event, zodValidator(shortlistNoteSchema))
  const { entry, user, role } = await requireShortlistRole(event, id, ANY_ROLE)
  return { entry: await editNote(useDb(), entry, user, role, note) }
})
