export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  // Clearing revokes the session id too (server/plugins/05.session-revocation.ts): a copied
  // cookie is refused from now on.
  await clearUserSession(event)
  await writeAudit(useDb(), { actorId: user.id, action: 'auth.logout', subjectType: 'user', subjectId: user.id, ip: clientAddress(event) })
  return { ok: true }
})
