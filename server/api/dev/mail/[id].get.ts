import { z } from 'zod'

const Params = z.object({ id: z.string().min(1).max(40) })

export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const { id } = validateParams(event, Params)
  const dir = await caughtMailDir()
  if (!dir) throw apiError(404, 'not_found', 'No development mailbox')
  const message = await readCaughtMail(dir, id)
  if (!message || (user.siteRole !== 'admin' && !mailIsFor(message, user.email))) throw apiError(404, 'not_found', 'Message not found')
  return publicMail(message)
})
