// The signed-in user and their teams (with role), or 401.
export default defineApiHandler(async (event) => {
  const user = requireUser(event)
  return { user: { id: user.id, email: user.email, name: user.name }, teams: await listTeamsOfUser(useDb(), user.id) }
})
