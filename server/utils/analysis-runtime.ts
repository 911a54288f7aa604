// The process's one analysis pool, and where its worker bundle is.
import { existsSync } from 'node:fs'
import { dirname, join, resolve } from 'node:path'
import { AnalysisPool, type PoolOptions } from './analysis-pool'

/**
 * Where the worker bundle is: next to the server entry in a built app (.output/server), else the
 * development build under .nuxt/. DRIFTLINE_ANALYSIS_WORKER overrides both.
 */
export function findWorkerFile (): string | null {
  const candidates = [
    process.env.DRIFTLINE_ANALYSIS_WORKER,
    process.argv[1] ? join(dirname(resolve(process.argv[1])), 'analysis-worker.mjs') : undefined,
    resolve('.output/server/analysis-worker.mjs'),
  ].filter((p): p is string => Boolean(p))
  return candidates.find(p => existsSync(p)) ?? null
}

let pool: AnalysisPool | null = null

/** Starts the process's pool (once). */
export async function startAnalysisPool (o: PoolOptions): Promise<AnalysisPool> {
  if (!pool) {
    pool = new AnalysisPool(o)
    await pool.start()
  }
  return pool
}

/** Tells the pool a job was queued; harmless when no pool runs (it polls the queue anyway). */
export function wakeAnalysisPool (): void {
  pool?.wake()
}

/** Stops the pool (on shutdown). */
export async function stopAnalysisPool (): Promise<void> {
  const p = pool
  pool = null
  await p?.stop()
}

/** The running pool, or null. */
export function analysisPool (): AnalysisPool | null {
  return pool
}
