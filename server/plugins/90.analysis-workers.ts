// Starts the analysis pool once start-up (migrations, demo seed: 10.startup.ts) is done. In
// development the worker bundle is built on start into .nuxt/; a built app carries it next to
// its entry (the `compiled` hook in nuxt.config.ts puts it there).
import { join, resolve } from 'node:path'

export default defineNitroPlugin((nitroApp) => {
  const config = useRuntimeConfig().analysis
  const workers = Math.floor(Number(config.workers))
  if (!(workers > 0)) {
    console.info('[analysis] no worker threads (analysis.workers is 0): takes stay queued')
    return
  }
  const boot = async () => {
    await whenReady(24 * 3600_000)
    let workerFile = findWorkerFile()
    if (import.meta.dev) {
      // Rebuilt on every start so a change to the engine is picked up.
      const { buildAnalysisWorker } = await import('../analysis/worker-build')
      workerFile = resolve('.nuxt/analysis-worker.mjs')
      await buildAnalysisWorker(resolve('.'), workerFile)
    }
    if (!workerFile) throw new Error(`analysis worker bundle not found (looked next to ${join(process.argv[1] ?? '.', '..')})`)
    await startAnalysisPool({
      db: useDb,
      store: useObjectStore,
      workers,
      workerFile,
      maxBytes: Number(config.maxUploadBytes),
      maxDurationS: Number(config.maxDurationS),
    })
  }
  boot().catch(err => console.error(`[analysis] workers not started: ${(err as Error).message}`))
  nitroApp.hooks.hook('close', () => stopAnalysisPool())
})
