// The analysis pool: worker threads (runtimeConfig.analysis.workers) that take analysis jobs
// from the database queue (server/utils/jobs.ts). The main thread claims a job, reads the take's
// audio from the object store, hands the bytes to an idle worker, relays its progress to the
// database (which doubles as the lock's heartbeat) and to live listeners, and writes the analysis,
// its holds and the take's status in one transaction. Jobs survive a restart: at start every
// lock left by the previous process goes back to the queue. Failures of the engine on the audio
// itself (AnalysisError) fail the take with the engine's code and never retry; anything else
// (a crashed worker, the store briefly down) retries with backoff. The upload is never deleted.
import { hostname } from 'node:os'
import { randomBytes } from 'node:crypto'
import { Worker } from 'node:worker_threads'
import type { Knex } from 'knex'
import { ANALYSE_TAKE_JOB, claimJob, completeJob, failJob, requeueStaleJobs, setJobProgress, type Job } from './jobs'
import { loadTakeForAnalysis, markTakeAnalysing, markTakeFailed, markTakeQueued, analysisErrorMessage, reconcileTakeStatuses, saveAnalysis } from './take-analysis'
import { emitTakeEvent } from './take-events'
import { readAll, type ObjectStore } from './storage'
import type { WorkerJob, WorkerMessage } from '../analysis/worker'

export interface PoolOptions {
  db: () => Knex
  store: () => Promise<ObjectStore>
  workers: number
  workerFile: string
  maxBytes?: number
  maxDurationS?: number
  /** A job running longer than this is stopped (its worker restarted) and retried. */
  jobTimeoutMs?: number
  /** How often the queue is looked at when nobody wakes the pool (backoffs, other processes). */
  pollMs?: number
}

interface Running {
  job: Job<{ takeId: number }>
  takeId: number
  progress: number
  lastWrite: number
  resolve: (m: WorkerMessage) => void
}

interface Slot {
  index: number
  lockId: string
  worker: Worker | null
  ready: Promise<void> | null
  running: Running | null
  /** Workers in a row that died before they were ready (a broken bundle): backs off the restarts. */
  failedStarts: number
}

const PROGRESS_WRITE_MS = 500
const HEARTBEAT_MS = 15_000
const STALE_LOCK_MS = 120_000

export class AnalysisPool {
  private slots: Slot[] = []
  private stopping = false
  private started = false
  private pumping = false
  private again = false
  private timer: ReturnType<typeof setInterval> | null = null
  private heartbeat: ReturnType<typeof setInterval> | null = null
  private readonly tag = `${hostname()}:${process.pid}:${randomBytes(3).toString('hex')}`

  constructor (private readonly o: PoolOptions) {}

  /** Requeues what the previous process left running, starts the workers, and begins taking jobs. */
  async start (): Promise<void> {
    if (this.started) return
    this.started = true
    const db = this.o.db()
    // Whatever is still locked now was left by a process that stopped: this one holds no lock yet.
    const { requeued, failed } = await requeueStaleJobs(db, { olderThanMs: 0 })
    await reconcileTakeStatuses(db)
    if (requeued || failed) console.info(`[analysis] ${requeued} interrupted job(s) back in the queue, ${failed} given up`)
    for (let i = 0; i < Math.max(1, this.o.workers); i++) {
      const slot: Slot = { index: i, lockId: `${this.tag}:${i}`, worker: null, ready: null, running: null, failedStarts: 0 }
      this.slots.push(slot)
      this.spawn(slot)
    }
    this.timer = setInterval(() => this.wake(), this.o.pollMs ?? 1000)
    this.timer.unref?.()
    this.heartbeat = setInterval(() => { void this.beat() }, HEARTBEAT_MS)
    this.heartbeat.unref?.()
    console.info(`[analysis] ${this.slots.length} worker thread(s) from ${this.o.workerFile}`)
    this.wake()
  }

  /** Stops taking jobs and ends the workers; running jobs are requeued at the next start. */
  async stop (): Promise<void> {
    this.stopping = true
    if (this.timer) clearInterval(this.timer)
    if (this.heartbeat) clearInterval(this.heartbeat)
    await Promise.allSettled(this.slots.map(s => s.worker?.terminate()))
    this.slots = []
  }

  /** Looks at the queue now (called after a job is added). */
  wake (): void {
    if (this.stopping || !this.started) return
    if (this.pumping) { this.again = true; return }
    this.pumping = true
    void this.pump().finally(() => {
      this.pumping = false
      if (this.again) { this.again = false; this.wake() }
    })
  }

  /** How many workers are busy, for health and benchmarks. */
  stats (): { workers: number, busy: number } {
    return { workers: this.slots.length, busy: this.slots.filter(s => s.running).length }
  }

  private spawn (slot: Slot) {
    const worker = new Worker(this.o.workerFile, { name: `analysis-${slot.index}` })
    slot.worker = worker
    let ready = false
    slot.ready = new Promise((ok) => {
      const onMsg = (m: WorkerMessage) => { if (m?.type === 'ready') { ready = true; slot.failedStarts = 0; worker.off('message', onMsg); ok() } }
      worker.on('message', onMsg)
      worker.once('exit', () => ok()) // a worker that never got ready: run() sees it gone
    })
    worker.on('message', (m: WorkerMessage) => this.onMessage(slot, m))
    worker.on('error', (err: Error) => {
      if (slot.failedStarts < 3) console.error(`[analysis] worker ${slot.index} failed: ${err.message}`)
    })
    worker.on('exit', (code) => {
      if (slot.worker !== worker) return
      slot.worker = null
      const r = slot.running
      if (r) r.resolve({ type: 'error', jobId: r.job.id, analysis: false, code: 'worker_exit', message: `worker stopped (exit code ${code})` })
      if (!ready) slot.failedStarts++
      if (!this.stopping) {
        // A worker that dies at once (a broken bundle) must not spin: back off up to a minute.
        const delay = ready ? 200 : Math.min(60_000, 1000 * 2 ** slot.failedStarts)
        if (slot.failedStarts === 3) console.error(`[analysis] worker ${slot.index} keeps failing at start; retrying every ${Math.round(delay / 1000)} s or more`)
        setTimeout(() => { if (!this.stopping) { this.spawn(slot); this.wake() } }, delay).unref?.()
      }
    })
  }

  private onMessage (slot: Slot, m: WorkerMessage) {
    const r = slot.running
    if (!r || m.type === 'ready' || m.jobId !== r.job.id) return
    if (m.type === 'progress') {
      r.progress = m.progress
      emitTakeEvent({ takeId: r.takeId, status: 'analysing', progress: m.progress, error: null })
      const now = Date.now()
      if (now - r.lastWrite >= PROGRESS_WRITE_MS) {
        r.lastWrite = now
        setJobProgress(this.o.db(), r.job.id, slot.lockId, m.progress).catch(() => {})
      }
      return
    }
    r.resolve(m)
  }

  // Refreshes the locks of running jobs, so a long decode is never mistaken for a dead worker;
  // also returns to the queue jobs whose worker vanished without a word (another process).
  private async beat () {
    const db = this.o.db()
    for (const s of this.slots) {
      if (s.running) await setJobProgress(db, s.running.job.id, s.lockId, s.running.progress).catch(() => {})
    }
    await requeueStaleJobs(db, { olderThanMs: STALE_LOCK_MS }).catch(() => {})
  }

  private async pump () {
    while (!this.stopping) {
      const slot = this.slots.find(s => !s.running && s.worker)
      if (!slot) return
      let job: Job<{ takeId: number }> | null
      try {
        job = await claimJob(this.o.db(), slot.lockId, { kinds: [ANALYSE_TAKE_JOB] })
      } catch (err) {
        console.error(`[analysis] could not read the queue: ${(err as Error).message}`)
        return
      }
      if (!job) return
      void this.run(slot, job)
    }
  }

  private async run (slot: Slot, job: Job<{ takeId: number }>) {
    const takeId = Number(job.payload?.takeId ?? job.takeId)
    let settle!: (m: WorkerMessage) => void
    const answer = new Promise<WorkerMessage>((ok) => { settle = ok })
    const running: Running = { job, takeId, progress: 0, lastWrite: 0, resolve: m => settle(m) }
    slot.running = running
    const db = this.o.db()
    const claimedAt = new Date()
    const t0 = performance.now()
    try {
      const loaded = await loadTakeForAnalysis(db, takeId)
      if (!loaded) {
        await completeJob(db, job.id, slot.lockId, { skipped: 'take_missing' })
        return
      }
      const { take, drill } = loaded
      if (!drill) {
        await this.giveUp(slot, job, takeId, 'analysis_error', 'The drill of this take no longer exists')
        return
      }
      await markTakeAnalysing(db, takeId, drill.version)
      emitTakeEvent({ takeId, status: 'analysing', progress: 0, error: null })

      const store = await this.o.store()
      const obj = await store.get(take.objectKey)
      if (!obj) {
        await this.giveUp(slot, job, takeId, 'audio_missing')
        return
      }
      const bytes = await readAll(obj.body)
      const fetchMs = performance.now() - t0
      await slot.ready
      const worker = slot.worker
      if (!worker) throw new Error('worker not running')
      if (this.stopping) throw new Error('shutting down')
      const doc = drill.document
      const msg: WorkerJob = {
        type: 'job', jobId: job.id, takeId, bytes, drill: doc, part: take.part,
        system: doc.system, a4: doc.a4, tolerance: doc.tolerance,
        maxBytes: this.o.maxBytes, maxDurationS: this.o.maxDurationS,
      }
      const timeout = setTimeout(() => {
        settle({ type: 'error', jobId: job.id, analysis: false, code: 'timeout', message: 'analysis took too long' })
        // Take the hung worker out of service at once, then start a fresh one.
        if (slot.worker === worker) slot.worker = null
        void worker.terminate().finally(() => { if (!this.stopping) { this.spawn(slot); this.wake() } })
      }, this.o.jobTimeoutMs ?? 10 * 60_000)
      worker.postMessage(msg, [bytes.buffer as ArrayBuffer])
      const m = await answer
      clearTimeout(timeout)

      if (m.type === 'result') {
        const saved = await db.transaction(async (trx) => {
          const id = await saveAnalysis(trx, {
            takeId, drillVersion: drill.version, system: doc.system,
            measurement: m.measurement, report: m.report, durationMs: m.ms,
          })
          // Lost the lock (this job was given to another worker meanwhile): keep nothing.
          // Where the time went, for the benchmark and for anyone reading the queue.
          const timing = { claimedAt: claimedAt.toISOString(), fetchMs: Math.round(fetchMs), analyseMs: m.ms, totalMs: Math.round(performance.now() - t0) }
          if (!await completeJob(trx, job.id, slot.lockId, { analysisId: id, ...timing })) throw new LostLock()
          return id
        }).catch((err) => { if (err instanceof LostLock) return null; throw err })
        if (saved != null) emitTakeEvent({ takeId, status: 'analysed', progress: 1, error: null })
      } else if (m.type === 'error' && m.analysis) {
        await this.giveUp(slot, job, takeId, m.code, m.message)
      } else if (m.type === 'error') {
        await this.retryLater(slot, job, takeId, `${m.code}: ${m.message}`)
      }
    } catch (err) {
      if (this.stopping) return // the lock is left; the next start puts the job back in the queue
      await this.retryLater(slot, job, takeId, (err as Error)?.message ?? String(err)).catch((e) => {
        console.error(`[analysis] job ${job.id} could not be put back: ${(e as Error).message}`)
      })
    } finally {
      slot.running = null
      this.wake()
    }
  }

  /** The audio cannot be scored: the take fails with the engine's code; no retry. */
  private async giveUp (slot: Slot, job: Job, takeId: number, code: string, message?: string) {
    const db = this.o.db()
    const text = message ?? analysisErrorMessage(code)
    const ok = await db.transaction(async (trx) => {
      const r = await failJob(trx, job.id, slot.lockId, `${code}: ${text}`, { retry: false })
      if (r === null) return false
      await markTakeFailed(trx, takeId, code, text)
      return true
    })
    if (ok) emitTakeEvent({ takeId, status: 'failed', progress: 0, error: { code, message: text } })
  }

  /** Something other than the audio went wrong: back in the queue after a backoff, failed at the last attempt. */
  private async retryLater (slot: Slot, job: Job, takeId: number, reason: string) {
    const db = this.o.db()
    console.warn(`[analysis] take ${takeId} (job ${job.id}, attempt ${job.attempts}): ${reason}`)
    const outcome = await db.transaction(async (trx) => {
      const r = await failJob(trx, job.id, slot.lockId, reason.slice(0, 1000))
      if (r === 'requeued') await markTakeQueued(trx, takeId)
      if (r === 'failed') await markTakeFailed(trx, takeId, 'analysis_error')
      return r
    })
    if (outcome === 'requeued') emitTakeEvent({ takeId, status: 'queued', progress: 0, error: null })
    if (outcome === 'failed') emitTakeEvent({ takeId, status: 'failed', progress: 0, error: { code: 'analysis_error', message: analysisErrorMessage('analysis_error') } })
  }
}

class LostLock extends Error {}
