// Development mailbox (only while the embedded catcher runs). A site admin sees every message,
// anyone else only mail addressed to them: reset links must not be readable by other accounts.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const dir = await caughtMailDir()
  if (!dir) throw apiError(404, 'not_found', 'No development mailbox')
  const messages = await listCaughtMail(dir)
  return messages.filter(m => user.siteRole === 'admin' || mailIsFor(m, user.email)).map(publicMail)
})
