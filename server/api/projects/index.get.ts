// Projects of every team the user belongs to, with the user's role in each.
export default defineApiHandler(async (event) => {
  const user = requireUser(event)
  return { projects: await listProjectsOfUser(useDb(), user.id) }
})
