// Every page but sign-in/sign-up needs a session; signed-in users skip the sign-in pages.
const PUBLIC_PAGES = new Set(['/sign-in', '/sign-up'])

export default defineNuxtRouteMiddleware(async (to) => {
  const me = useSessionUser()
  if (!me.value) await refreshSessionUser()
  if (PUBLIC_PAGES.has(to.path)) {
    if (me.value) return navigateTo('/projects')
    return
  }
  if (!me.value) return navigateTo({ path: '/sign-in', query: to.fullPath !== '/' && to.fullPath !== '/projects' ? { next: to.fullPath } : {} })
})
