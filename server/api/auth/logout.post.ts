export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const session = await getUserSession(event)
  const db = useDb()
  // The sealed cookie would stay valid if copied: its id is refused from now on.
  if (session.id) await revokeSession(db, session.id, user.id, Number(session.loggedInAt ?? Date.now()) + sessionMaxAgeS() * 1000)
  await clearUserSession(event)
  await writeAudit(db, { actorId: user.id, action: 'auth.logout', subjectType: 'user', subjectId: user.id, ip: clientAddress(event) })
  return { ok: true }
})
