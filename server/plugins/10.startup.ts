// Start-up: embedded object store and mail catcher (loopback only), migrations, and the demo
// scenario when the database is empty. Runs in the background; /api requests wait for it
// (server/middleware/00.ready.ts) so the first request never meets a half-made schema.
import { migrateLatest } from '../database/migrations'
import { seedDemoIfEmpty } from '../../seeds/demo/index'

export default defineNitroPlugin((nitroApp) => {
  setStartup(startup())
  nitroApp.hooks.hook('close', async () => {
    await Promise.allSettled([stopObjectStore(), stopMail()])
    await closeDb()
  })
})

async function startup (): Promise<StartupInfo> {
  const t0 = performance.now()
  const config = useRuntimeConfig()
  const db = useDb()

  const [migrations, store, mail] = await Promise.all([
    migrateLatest(db),
    useObjectStore().catch((err) => { console.error(`[storage] not started: ${(err as Error).message}`); return null }),
    startMail().catch((err) => { console.error(`[mail] catcher not started: ${(err as Error).message}`); return null }),
  ])
  console.info(`[db] ${config.dbFile}: ${migrations.length ? `ran ${migrations.join(', ')}` : 'schema up to date'}`)
  const s3 = embeddedObjectStore()
  if (s3) console.info(`[storage] embedded object store on ${s3.endpoint} (data in ${s3.dir})`)
  else if (store) console.info(`[storage] object store ${config.storage.endpoint || '(provider default)'} bucket "${config.storage.bucket}"`)
  if (mail) console.info(`[mail] embedded mail catcher on ${mail.host}:${mail.port} (messages in ${mail.dir})`)
  else if (!config.mail.host) console.warn('[mail] no SMTP server (NUXT_MAIL_HOST) and no mail catcher: mail is not sent')

  let seeded = false
  if (!seedDemoEnabled() && explicitSwitch(config.seedDemo) === null) {
    console.info('[seed] demo scenario off: a real object store or SMTP server is configured (NUXT_SEED_DEMO=true seeds it anyway)')
  }
  if (seedDemoEnabled()) {
    try {
      const result = await seedDemoIfEmpty(db, {
        hashPassword,
        put: async (key, bytes, contentType) => {
          if (!store) throw new Error('object store unavailable')
          await store.put(key, bytes, { contentType })
        },
        log: m => console.info(`[seed] ${m}`),
      })
      seeded = Boolean(result)
      if (result) console.info(`[seed] demo scenario: ${result.users} people, ${result.drills} drills, ${result.takes} takes in ${result.ms} ms`)
    } catch (err) {
      console.error(`[seed] demo scenario not seeded: ${(err as Error).message}`)
    }
  }
  const ms = Math.round(performance.now() - t0)
  console.info(`[driftline] ready in ${ms} ms`)
  return { ms, migrations, seeded }
}
