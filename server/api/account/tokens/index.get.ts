export default defineApiHandler(async (event) => {
  const user = requireUser(event)
  requireSessionAuth(event)
  return { tokens: await listApiTokens(useDb(), user.id) }
})
