// The signed-in user as nuxt-auth-utils keeps it in the sealed session cookie (both sides read it).
declare module '#auth-utils' {
  interface User {
    id: number
    email: string
    name: string
    siteRole: 'admin' | null
  }
  interface UserSession {
    /** Milliseconds since the epoch; sessions older than a password change are refused. */
    loggedInAt: number
  }
}

export {}
