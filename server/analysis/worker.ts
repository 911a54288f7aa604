// Worker-thread entry of the analysis pool (server/utils/analysis-pool.ts). Built on its own with
// esbuild (Nitro's chunks cannot be a worker entry): it imports the engine only, no Nitro.
// One job at a time: the parent sends the take's bytes (transferred, not copied) with the drill
// and the scoring options; the worker answers with progress, then the result or an error.
import { parentPort, threadId } from 'node:worker_threads'
import { setPriority } from 'node:os'
import type { DrillDocument, SystemOptions } from '../../shared/drill/schema'
import type { TakeReport } from '../../shared/types/take'
import { analyzeTake, type AnalyzeOptions } from './index'
import { isAnalysisError } from './errors'
import type { Measurement } from './types'

/** parent → worker */
export interface WorkerJob {
  type: 'job'
  jobId: number
  takeId: number
  bytes: Uint8Array
  drill: DrillDocument
  part: string
  system: SystemOptions
  a4: number
  tolerance: number
  maxBytes?: number | undefined
  maxDurationS?: number | undefined
}

/** worker → parent; a result's report is the one the server stores and sends (shared/types/take.ts). */
export type WorkerMessage =
  | { type: 'ready', threadId: number }
  | { type: 'progress', jobId: number, progress: number }
  | { type: 'result', jobId: number, measurement: Measurement, report: TakeReport, ms: number }
  | { type: 'error', jobId: number, analysis: boolean, code: string, message: string, details?: Record<string, unknown> }

const port = parentPort
if (!port) throw new Error('analysis worker must run in a worker thread')

// On Linux a thread has its own nice value: analysis yields the CPU to the HTTP thread, so
// pages stay quick while uploads are measured. Elsewhere this call would renice the whole process.
// DRIFTLINE_ANALYSIS_NICE (0–19, default 10) sets it; 0 leaves the thread at normal priority.
const NICE = Math.min(19, Math.max(0, Math.round(Number(process.env.DRIFTLINE_ANALYSIS_NICE ?? 10)) || 0))
if (process.platform === 'linux' && NICE > 0) {
  try { setPriority(0, NICE) } catch { /* not allowed here: run at normal priority */ }
}

port.on('message', (msg: WorkerJob) => {
  if (msg?.type !== 'job') return
  void run(msg)
})
port.postMessage({ type: 'ready', threadId } satisfies WorkerMessage)

async function run (job: WorkerJob) {
  const started = performance.now()
  let last = -1
  let lastAt = 0
  const onProgress = (p: number) => {
    if (!Number.isFinite(p)) return
    const progress = Math.min(1, Math.max(0, p))
    const now = performance.now()
    // A few messages a second are enough for a progress bar.
    if (progress < 1 && progress - last < 0.02 && now - lastAt < 200) return
    last = progress
    lastAt = now
    port!.postMessage({ type: 'progress', jobId: job.jobId, progress } satisfies WorkerMessage)
  }
  try {
    const opts: AnalyzeOptions = {
      system: job.system,
      a4: job.a4,
      tolerance: job.tolerance,
      onProgress,
      ...(job.maxBytes !== undefined ? { maxBytes: job.maxBytes } : {}),
      ...(job.maxDurationS !== undefined ? { maxDurationS: job.maxDurationS } : {}),
    }
    const { measurement, report } = await analyzeTake(job.bytes, job.drill, job.part, opts)
    port!.postMessage({ type: 'result', jobId: job.jobId, measurement, report, ms: Math.round(performance.now() - started) } satisfies WorkerMessage)
  } catch (err) {
    if (isAnalysisError(err)) {
      port!.postMessage({
        type: 'error', jobId: job.jobId, analysis: true, code: err.code, message: err.message,
        details: plain(err.details),
      } satisfies WorkerMessage)
    } else {
      const e = err as Error
      port!.postMessage({
        type: 'error', jobId: job.jobId, analysis: false, code: 'engine_error',
        message: e?.message ? String(e.message).slice(0, 500) : String(err).slice(0, 500),
      } satisfies WorkerMessage)
    }
  }
}

// Details cross the thread boundary by structured clone; keep only plain JSON.
function plain (details: unknown): Record<string, unknown> | undefined {
  if (details == null) return undefined
  try { return JSON.parse(JSON.stringify(details)) as Record<string, unknown> } catch { return undefined }
}
