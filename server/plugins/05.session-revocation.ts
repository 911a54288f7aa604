// nuxt-auth-utils adds GET and DELETE /api/_auth/session (the client's session fetch and sign-out).
// Left alone, DELETE only drops the cookie in the browser that sent it, and GET trusts any cookie
// that unseals. These hooks make both follow our rules: clearing a session revokes its id, and a
// fetched session is checked like every route's (revoked, expired, password changed, account
// disabled) and answered as signed out when it fails.
export default defineNitroPlugin(() => {
  sessionHooks.hook('clear', async (_data, event) => {
    await revokeCurrentSession(event)
  })
  sessionHooks.hook('fetch', async (session, event) => {
    const fields = session as Record<string, unknown>
    try {
      // Fresh from the database: a renamed user sees the new name.
      fields.user = await requireUser(event)
    } catch {
      for (const key of Object.keys(fields)) delete fields[key]
    }
  })
})
