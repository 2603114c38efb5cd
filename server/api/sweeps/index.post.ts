import { sweepRequestSchema } from '#shared/types/sweep'

export default defineApiHandler(async (event) => {
  const body = await readValidatedBody(event, zodValidator(sweepRequestSchema))
  const run = await startRunFromRequest(event, body, 'sweep')
  setResponseStatus(event, 201)
  return { sweep: run }
})
