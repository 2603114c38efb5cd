// Every page but sign-in/sign-up needs a session; signed-in users skip the sign-in pages.
const PUBLIC_PAGES = new Set(['/sign-in', '/sign-up'])
// Reachable signed in or out: links from mails, and the development mailbox (its page sends a signed-out reader
// to sign in once the API says demo mode is on; outside demo mode it is a 404 for everyone).
const OPEN_PREFIXES = ['/invitations/', '/reset-password', '/dev/mailbox']

export default defineNuxtRouteMiddleware(async (to) => {
  const me = useSessionUser()
  // asked once per page load (on the server for a rendered page): a signed-out reader is not probed again
  if (!me.value && !useSessionKnown().value) await refreshSessionUser()
  if (OPEN_PREFIXES.some((p) => to.path.startsWith(p))) return
  if (PUBLIC_PAGES.has(to.path)) {
    if (me.value) return navigateTo('/projects')
    return
  }
  if (!me.value) return navigateTo({ path: '/sign-in', query: to.fullPath !== '/' && to.fullPath !== '/projects' ? { next: to.fullPath } : {} })
})
