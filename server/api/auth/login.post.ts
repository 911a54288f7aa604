import { LoginBody } from '../../../shared/schemas/auth'

// Unknown address and wrong password get the same answer, after the same work (a dummy hash is
// verified when there is no account), so neither text nor timing tells which it was.
export default defineEventHandler(async (event) => {
  const body = await readJsonBody(event, LoginBody)
  assertLoginAllowed(event, body.email)
  const db = useDb()
  const ip = clientAddress(event)
  const account = await findAccountByEmail(db, body.email)
  const hash = account?.passwordHash ?? await dummyPasswordHash(hashPassword)
  const valid = await verifyPassword(hash, body.password)
  if (!account || !account.passwordHash || account.disabledAt || !valid) {
    recordLoginFailure(event, body.email)
    await writeAudit(db, { actorId: account?.id ?? null, action: 'auth.login_failed', ip, data: { email: body.email } })
    throw apiError(401, 'wrong_credentials', 'Wrong e-mail or password')
  }
  recordLoginSuccess(event, body.email)
  const user = toSessionUser({ id: account.id, email: account.email, name: account.name, site_role: account.siteRole })
  await startSession(event, user)
  await markSignedIn(db, user.id, ip)
  return { user }
})
