// In demo mode (npm start / npm run dev) the sign-in page lists the demo accounts; otherwise this does not exist.
export default defineApiHandler((event) => {
  if (!useRuntimeConfig(event).public.demoMode) {
    throw createError({ statusCode: 404, statusMessage: 'Not Found', message: 'Demo mode is off.' })
  }
  return { team: DEMO_TEAM.name, accounts: DEMO_USERS.map(({ email, name, role, password }) => ({ email, name, role, password })) }
})
