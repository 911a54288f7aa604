import { fileURLToPath } from 'node:url'

// Runtime settings: every key below can be set by its NUXT_* environment variable
// (e.g. dbFile ← NUXT_DB_FILE, storage.endpoint ← NUXT_STORAGE_ENDPOINT). The defaults run
// the whole product embedded on loopback: a SQLite file, a local S3-compatible object store
// and a mail catcher, all under storage/.
export default defineNuxtConfig({
  // The development-server test builds into a folder of its own so it never disturbs `.nuxt`.
  ...(process.env.NUXT_DEV_TEST_BUILD_DIR ? { buildDir: process.env.NUXT_DEV_TEST_BUILD_DIR } : {}),
  compatibilityDate: '2026-11-01',
  devtools: { enabled: false },
  telemetry: false,
  modules: ['@pinia/nuxt', '@nuxtjs/tailwindcss', 'nuxt-auth-utils'],
  // components/takes/TakeReport.vue is <TakeReport>: the file name already carries the domain.
  components: [{ path: '~/components', pathPrefix: false }],
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
      link: [{ rel: 'icon', type: 'image/svg+xml', href: '/favicon.svg' }],
    },
  },
  runtimeConfig: {
    /** SQLite database file. */
    dbFile: './storage/driftline.sqlite',
    /**
     * Seed the demo scenario when the database is empty. 'auto': yes, unless a real object store
     * (storage.endpoint) or SMTP server (mail.host) is configured; true/false decide outright.
     */
    seedDemo: 'auto',
    storage: {
      /** Start the local S3-compatible object store on loopback (off when endpoint is set). */
      embedded: true,
      /** Folder of the embedded object store. */
      dir: './storage/objects',
      endpoint: '',
      region: 'us-east-1',
      bucket: 'driftline',
      /** Empty: the embedded store uses the install's generated keys (kept in storage/), a provider its own credential chain. */
      accessKeyId: '',
      secretAccessKey: '',
    },
    mail: {
      /** Start the local mail catcher on loopback: never when host is set; 'auto' = unless a real object store is set. */
      embedded: 'auto',
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
    /** Sealed session cookie (nuxt-auth-utils); the password comes from NUXT_SESSION_PASSWORD. */
    session: {
      /** Seconds a sign-in lasts (14 days). */
      maxAge: 60 * 60 * 24 * 14,
    },
    /**
     * Sign-in rate limit, failed attempts within windowS seconds: per account from one client
     * address, per account from every address (far higher, so nobody can lock the owner out),
     * and per client address.
     */
    login: {
      maxFailuresPerAccountAddress: 5,
      maxFailuresPerAccount: 100,
      maxFailuresPerAddress: 30,
      windowS: 900,
    },
    invitations: {
      /** Days an invitation link stays valid. */
      ttlDays: 7,
    },
    assignments: {
      /** How often the notice and reminder jobs are looked for, in ms. */
      pollMs: 2000,
      /** Seconds between two runs of the reminder sweep (a reminder goes out a day before the due date). */
      reminderEveryS: 600,
    },
    /** Largest JSON body in bytes. */
    maxJsonBytes: 1024 * 1024,
    /** Public address used in mailed links. */
    baseUrl: 'http://localhost:3000',
    public: {
      /** Show the development mailbox while the mail catcher runs ('auto' = yes; false hides it). */
      devMailbox: 'auto',
    },
  },
  vite: {
    // The packages the pages import, pre-bundled for the browser from the start: one found only
    // when a page first loads (zod through a client plugin, @tonaljs/tonal through shared code)
    // makes Vite re-bundle and reload that page, failing its first script import
    // (https://vite.dev/guide/dep-pre-bundling.html).
    optimizeDeps: {
      include: [
        'zod', '@tonaljs/tonal', '@tonejs/midi', 'chart.js', 'vue-chartjs', 'wavesurfer.js',
        'wavesurfer.js/dist/plugins/regions.esm.js', 'papaparse', 'fflate', 'fast-xml-parser',
        'opensheetmusicdisplay',
      ],
    },
  },
  nitro: {
    experimental: { tasks: false },
    // The server runs on Node 20: BigInt literals (exact tuning ratios) need no lowering.
    esbuild: { options: { target: 'node20' } },
    // Node 20.19 loads packages through their "module-sync" export condition, which the file
    // tracer only follows on Node 22: without it .output lacks e.g. async-function/require.mjs,
    // which the embedded object store (s3rver → koa → get-intrinsic) needs.
    externals: { traceOptions: { conditions: ['production', 'node', 'module-sync'] } },
    hooks: {
      // The analysis worker thread needs an entry file of its own (Nitro's chunks cannot be one):
      // bundle it next to the built server entry. Development builds it on start instead.
      async compiled (nitro) {
        if (nitro.options.dev) return
        const { buildAnalysisWorker, WORKER_BUNDLE } = await import('./server/analysis/worker-build')
        await buildAnalysisWorker(nitro.options.rootDir, `${nitro.options.output.serverDir}/${WORKER_BUNDLE}`)
      },
    },
  },
  hooks: {
    // JSON errors under /api/ whatever the Accept header: our handler runs before the page one.
    'nitro:config'(config) {
      const own = fileURLToPath(new URL('./server/error-handler.ts', import.meta.url))
      const others = config.errorHandler ? (Array.isArray(config.errorHandler) ? config.errorHandler : [config.errorHandler]) : []
      config.errorHandler = [own, ...others.filter(h => h !== own)]
    },
    // Keep the development hot-reload socket on loopback like the rest of the product.
    // The server-side Vite has hot reload off but would still open a socket on every interface.
    'vite:extendConfig'(config) {
      const server = config.server as { hmr?: unknown, ws?: false } | undefined
      if (!server) return
      if (server.hmr === false) server.ws = false
      else server.hmr = { ...(typeof server.hmr === 'object' ? server.hmr : {}), host: 'localhost' }
    },
  },
  devServer: { host: 'localhost', port: 3000 },
})
