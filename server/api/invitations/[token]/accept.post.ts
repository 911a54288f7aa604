import { AcceptBody, TokenParams } from '../../../../shared/schemas/ensemble'

// POST /api/invitations/:token/accept (public). Signed in as the invited address: joins the ensemble.
// Signed out, for an address without an account: { name, password } creates it. Either way → 200 and
// a signed-in session. An address that has an account must sign in first (401 sign_in_required).
export default defineEventHandler(async (event) => {
  const { token } = validateParams(event, TokenParams)
  const db = useDb()
  const found = await findInvitationByToken(db, token)
  if (!found) throw apiError(404, 'not_found', 'This invitation link is not valid')
  if (found.status !== 'open') throw invitationGone(found.status)
  // A cookie that no longer signs anyone in (expired, signed out elsewhere) counts as signed out.
  const signedIn = Boolean((await getUserSession(event)).user)
  const user = signedIn ? await requireUser(event).catch(() => null) : null
  if (found.disabled) throw apiError(403, 'account_disabled', 'This account is disabled')
  if (user && user.email !== found.row.email) throw apiError(403, 'wrong_account', `This invitation is for ${found.row.email}: sign out and open the link again`)
  if (!user && found.hasPassword) throw apiError(401, 'sign_in_required', `Sign in as ${found.row.email} to accept`)
  const who = user ? { userId: user.id } : await readJsonBody(event, AcceptBody).then(async b => ({ name: b.name, passwordHash: await hashPassword(b.password) }))
  const r = await acceptInvitation(db, found.row.id, who, clientAddress(event))
  if (!r.ok) throw invitationGone('accepted')
  const account = await db('users').where({ id: r.userId }).first('id', 'email', 'name', 'site_role')
  const sessionUser = toSessionUser(account)
  if (!user) await replaceUserSession(event, { user: sessionUser, loggedInAt: Date.now() })
  return { ensembleId: r.ensembleId, user: sessionUser }
})
