// Mails assignment notices and reminders from the job queue once start-up is done.
import type { AssignmentMailRunner } from '../utils/assignment-mail'
export default defineNitroPlugin((nitroApp) => {
  const c = useRuntimeConfig()
  const conf = c.assignments as { pollMs?: number, reminderEveryS?: number }
  let runner: AssignmentMailRunner | null = null
  let closed = false
  whenReady(24 * 3600_000).then(() => {
    if (closed) return
    runner = startAssignmentMail({
      db: useDb,
      send: sendMail,
      baseUrl: String(c.baseUrl),
      pollMs: Math.max(200, Number(conf?.pollMs) || 2000),
      everyMs: Math.max(1, Number(conf?.reminderEveryS) || 600) * 1000,
    })
  }).catch(err => console.error(`[assignments] mail runner not started: ${(err as Error).message}`))
  nitroApp.hooks.hook('close', async () => {
    closed = true
    await runner?.stop()
  })
})
