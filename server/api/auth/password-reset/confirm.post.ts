import { PasswordResetConfirmBody } from '../../../../shared/schemas/auth'

export default defineEventHandler(async (event) => {
  const body = await readJsonBody(event, PasswordResetConfirmBody)
  const hash = await hashPassword(body.password)
  const userId = await resetPasswordWithToken(useDb(), body.token, hash, clientAddress(event))
  if (!userId) throw apiError(400, 'invalid_token', 'This reset link is invalid or has expired')
  return { ok: true }
})
