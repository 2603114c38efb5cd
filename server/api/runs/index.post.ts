import { runRequestSchema } from '#shared/types/sweep'

export default defineApiHandler(async (event) => {
  const body = await readValidatedBody(event, zodValidator(runRequestSchema))
  const run = await startRunFromRequest(event, body, 'single')
  setResponseStatus(event, 201)
  return { run }
})
