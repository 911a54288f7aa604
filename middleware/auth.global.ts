// Page guard for the user's convenience only: every API route checks the session itself.

declare module '#app' {
  interface PageMeta {
    /** Reachable without a session (sign-in, password reset, invitations). */
    public?: boolean
    /** Only for signed-out visitors: a signed-in user is sent on (e.g. the sign-in page). */
    guestOnly?: boolean
  }
}

export default defineNuxtRouteMiddleware((to) => {
  const { loggedIn } = useUserSession()
  if (to.meta.public) {
    if (to.meta.guestOnly && loggedIn.value) return navigateTo(safeRedirect(to.query.redirect))
    return
  }
  if (!loggedIn.value) {
    return navigateTo({ path: '/login', query: to.fullPath === '/' ? {} : { redirect: to.fullPath } })
  }
})
