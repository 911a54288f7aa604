import type { SessionUser } from '#shared/types/user'

/** Typed view of nuxt-auth-utils' session plus sign-out; the server decides, this only mirrors. */
export function useCurrentUser() {
  const session = useUserSession()
  const user = computed(() => (session.user.value as SessionUser | null) ?? null)
  const isAdmin = computed(() => user.value?.siteRole === 'admin')

  /** Ends the session on the server, forgets cached data and goes to the sign-in page. */
  async function signOut() {
    try {
      await $fetch('/api/auth/logout', { method: 'POST' })
    } catch {
      // The cookie is cleared below either way; a failed logout call must not trap the user.
    }
    try {
      await session.clear()
    } catch {
      // Already gone on the server.
    }
    clearNuxtData()
    await navigateTo('/login')
  }

  return { user, loggedIn: session.loggedIn, isAdmin, refresh: session.fetch, signOut }
}
