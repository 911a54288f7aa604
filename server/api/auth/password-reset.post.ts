import { PasswordResetBody } from '../../../shared/schemas/auth'

// Always 202, whether or not the address has an account; the mail goes out in the background so
// the answer takes as long either way.
export default defineEventHandler(async (event) => {
  const body = await readJsonBody(event, PasswordResetBody)
  const db = useDb()
  if (allowPasswordResetRequest(event, body.email)) {
    const account = await findAccountByEmail(db, body.email)
    if (account && !account.disabledAt) {
      const token = await createPasswordReset(db, account.id, clientAddress(event))
      const link = `${String(useRuntimeConfig().baseUrl).replace(/\/+$/, '')}/reset-password?token=${encodeURIComponent(token)}`
      sendMail(passwordResetMail(account.email, account.name, link))
        .catch(err => console.error(`[mail] password reset mail not sent: ${(err as Error).message}`))
    }
  }
  setResponseStatus(event, 202)
  return { ok: true }
})
