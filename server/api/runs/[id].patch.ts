import { idParamSchema } from '../../../shared/types/project'
import { runPatchSchema } from '../../../shared/types/run'
import { renameRun } from '../../runs/rename'

// Lead and designer rename a run or sweep; the name is checked like other names (1–120 characters, bidi stripped).
export default defineApiHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, zodValidator(idParamSchema))
  const { run: before } = await requireRunRole(event, id, EDITOR_ROLES, 'renaming a run or sweep')
  const body = await readValidatedBody(event, zodValidator(runPatchSchema))
  const run = await renameRun(before.id, body.name)
  if (!run) throw notFound('Run not found among your teams\' projects.')
  return { run }
})
