// Public settings that depend on server-only ones: the pages learn whether the development
// mailbox is on (it follows the object store and SMTP settings) through this request's copy of
// the public runtime config. JSON answers never send the public config, so /api/ requests keep
// the process's shared settings (server/middleware/00.ready.ts) and skip the per-request copy.
export default defineNitroPlugin((nitroApp) => {
  nitroApp.hooks.hook('request', (event) => {
    if (event.path.startsWith('/api/')) return
    // A boolean replaces the 'auto' of nuxt.config.ts, so the pages read true or false.
    ;(useRuntimeConfig(event).public as { devMailbox: unknown }).devMailbox = devMailboxEnabled()
  })
})
