// Runtime settings: every key below can be set by its NUXT_* environment variable
// (e.g. dbFile ← NUXT_DB_FILE, storage.endpoint ← NUXT_STORAGE_ENDPOINT). The defaults run
// the whole product embedded on loopback: a SQLite file, a local S3-compatible object store
// and a mail catcher, all under storage/.
export default defineNuxtConfig({
  compatibilityDate: '2026-11-01',
  devtools: { enabled: false },
  telemetry: false,
  modules: ['@pinia/nuxt', '@nuxtjs/tailwindcss', 'nuxt-auth-utils'],
  css: ['@fontsource/lato/400.css', '@fontsource/lato/700.css', '@fontsource/lato/400-italic.css', '~/assets/css/main.css'],
  typescript: { strict: true },
  app: {
    head: {
      htmlAttrs: { lang: 'en' },
      title: 'Driftline',
      meta: [
        { name: 'viewport', content: 'width=device-width, initial-scale=1' },
        { name: 'description', content: 'Ensemble intonation drills, measured to a fraction of a cent.' },
      ],
    },
  },
  runtimeConfig: {
    /** SQLite database file. */
    dbFile: './storage/driftline.sqlite',
    /** Seed the demo scenario when the database is empty. */
    seedDemo: true,
    storage: {
      /** Start the local S3-compatible object store on loopback (off when endpoint is set). */
      embedded: true,
      /** Folder of the embedded object store. */
      dir: './storage/objects',
      endpoint: '',
      region: 'us-east-1',
      bucket: 'driftline',
      accessKeyId: 'S3RVER',
      secretAccessKey: 'S3RVER',
    },
    mail: {
      /** Start the local mail catcher on loopback (off when host is set). */
      embedded: true,
      /** Folder where the catcher keeps every message. */
      dir: './storage/mail',
      host: '',
      port: 587,
      secure: false,
      user: '',
      pass: '',
      from: 'Driftline <no-reply@example.org>',
    },
    analysis: {
      /** Worker threads that analyse takes. */
      workers: 2,
      /** Largest accepted upload in bytes (200 MB). */
      maxUploadBytes: 200 * 1024 * 1024,
      /** Longest accepted take in seconds (20 minutes). */
      maxDurationS: 1200,
    },
    /** Largest JSON body in bytes. */
    maxJsonBytes: 1024 * 1024,
    /** Public address used in mailed links. */
    baseUrl: 'http://localhost:3000',
    public: {
      /** Show the development mailbox (on whenever the embedded mail catcher runs). */
      devMailbox: true,
    },
  },
  nitro: {
    experimental: { tasks: false },
  },
  vite: {
    server: { host: 'localhost' },
  },
  devServer: { host: 'localhost', port: 3000 },
})
