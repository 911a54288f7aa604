import { PasswordChangeBody } from '../../../shared/schemas/account'

// POST /api/account/password {currentPassword, newPassword} → 200. Every other session of the
// account ends; this one continues with a fresh sign-in time. Wrong guesses count like sign-ins.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const body = await readJsonBody(event, PasswordChangeBody)
  assertLoginAllowed(event, user.email)
  const db = useDb()
  const hash = await passwordHashOf(db, user.id)
  if (!hash || !(await verifyPassword(hash, body.currentPassword))) {
    recordLoginFailure(event, user.email)
    throw apiError(400, 'wrong_password', 'Your current password is not right', {
      issues: [{ path: ['currentPassword'], message: 'This is not your current password', code: 'custom' }],
    })
  }
  if (body.newPassword === body.currentPassword) {
    throw apiError(400, 'same_password', 'Choose a password you are not using now', {
      issues: [{ path: ['newPassword'], message: 'Choose a password you are not using now', code: 'custom' }],
    })
  }
  await setPassword(db, user.id, await hashPassword(body.newPassword), clientAddress(event))
  await replaceUserSession(event, { user, loggedInAt: Date.now() })
  return { ok: true }
})
