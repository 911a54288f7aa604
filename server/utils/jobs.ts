// Background work queue in the database (table `jobs`). A job is claimed by one worker under a
// lock; progress doubles as a heartbeat; failures retry with exponential backoff until
// max_attempts; locks older than a limit (a worker that died) are put back in the queue.
// Plain Knex (no Nitro imports), so worker code can use it too.
import type { Knex } from 'knex'

export type JobStatus = 'queued' | 'running' | 'done' | 'failed'

export interface Job<P = Record<string, unknown>> {
  id: number
  kind: string
  payload: P
  status: JobStatus
  attempts: number
  maxAttempts: number
  runAfter: string
  lockedBy: string | null
  lockedAt: string | null
  progress: number
  error: string | null
  result: unknown
  takeId: number | null
  createdAt: string
  updatedAt: string
  finishedAt: string | null
}

const iso = (d: Date = new Date()) => d.toISOString()

function toJob (r: Record<string, any>): Job<any> {
  return {
    id: r.id,
    kind: r.kind,
    payload: r.payload ? JSON.parse(r.payload) : {},
    status: r.status,
    attempts: r.attempts,
    maxAttempts: r.max_attempts,
    runAfter: r.run_after,
    lockedBy: r.locked_by,
    lockedAt: r.locked_at,
    progress: r.progress,
    error: r.error,
    result: r.result ? JSON.parse(r.result) : null,
    takeId: r.take_id,
    createdAt: r.created_at,
    updatedAt: r.updated_at,
    finishedAt: r.finished_at,
  }
}

/** Delay before attempt n+1 after n failed attempts: 5 s, 20 s, 80 s … capped at 10 minutes. */
export function retryDelayMs (attempts: number): number {
  return Math.min(5000 * 4 ** Math.max(0, attempts - 1), 10 * 60_000)
}

/** Adds a job (pass a transaction to write it with the row it is about). Returns its id. */
export async function enqueueJob (db: Knex, kind: string, payload: Record<string, unknown>, opts: { takeId?: number | null, runAfter?: Date, maxAttempts?: number } = {}): Promise<number> {
  const now = iso()
  const [row] = await db('jobs').insert({
    kind,
    payload: JSON.stringify(payload),
    take_id: opts.takeId ?? null,
    run_after: iso(opts.runAfter ?? new Date()),
    max_attempts: opts.maxAttempts ?? 3,
    created_at: now,
    updated_at: now,
  }).returning('id')
  return typeof row === 'object' ? row.id : row
}

/** Takes the oldest due job (of the given kinds) for this worker, or null when none is due. */
export async function claimJob (db: Knex, workerId: string, opts: { kinds?: string[], now?: Date } = {}): Promise<Job<any> | null> {
  const now = iso(opts.now)
  const kinds = opts.kinds ?? []
  const kindSql = kinds.length ? ` and kind in (${kinds.map(() => '?').join(', ')})` : ''
  // One statement: the sub-select and the update run under SQLite's write lock, so two workers
  // (even in different processes) never claim the same job.
  const rows = await db.raw(
    `update jobs set status = 'running', locked_by = ?, locked_at = ?, attempts = attempts + 1, progress = 0, updated_at = ?
     where id = (select id from jobs where status = 'queued' and run_after <= ?${kindSql} order by run_after, id limit 1)
     returning *`,
    [workerId, now, now, now, ...kinds],
  ) as Record<string, any>[]
  return rows.length ? toJob(rows[0]!) : null
}

/** Records progress (0…1) and refreshes the lock; false when the worker no longer holds the job. */
export async function setJobProgress (db: Knex, id: number, workerId: string, progress: number): Promise<boolean> {
  const p = Number.isFinite(progress) ? Math.min(1, Math.max(0, progress)) : 0
  const now = iso()
  const n = await db('jobs').where({ id, locked_by: workerId, status: 'running' }).update({ progress: p, locked_at: now, updated_at: now })
  return n === 1
}

/** Marks the job done with an optional result; false when the worker no longer holds it. */
export async function completeJob (db: Knex, id: number, workerId: string, result?: unknown): Promise<boolean> {
  const now = iso()
  const n = await db('jobs').where({ id, locked_by: workerId, status: 'running' }).update({
    status: 'done', progress: 1, result: result === undefined ? null : JSON.stringify(result),
    error: null, locked_by: null, locked_at: null, finished_at: now, updated_at: now,
  })
  return n === 1
}

/**
 * Records a failure: back in the queue after retryDelayMs(attempts) while attempts remain and
 * `retry` is not false (an input that can never be analysed), otherwise failed for good.
 */
export async function failJob (db: Knex, id: number, workerId: string, error: string, opts: { retry?: boolean, now?: Date } = {}): Promise<'requeued' | 'failed' | null> {
  const now = opts.now ?? new Date()
  return db.transaction(async (trx) => {
    const row = await trx('jobs').where({ id, locked_by: workerId, status: 'running' }).first('attempts', 'max_attempts')
    if (!row) return null
    const again = opts.retry !== false && row.attempts < row.max_attempts
    await trx('jobs').where({ id }).update(again
      ? { status: 'queued', error, locked_by: null, locked_at: null, run_after: iso(new Date(now.getTime() + retryDelayMs(row.attempts))), updated_at: iso(now) }
      : { status: 'failed', error, locked_by: null, locked_at: null, finished_at: iso(now), updated_at: iso(now) })
    return again ? 'requeued' : 'failed'
  })
}

/**
 * Running jobs whose lock is older than `olderThanMs` (their worker died or hung) go back to the
 * queue, or fail when they have used every attempt. Returns how many were touched.
 */
export async function requeueStaleJobs (db: Knex, opts: { olderThanMs: number, now?: Date }): Promise<{ requeued: number, failed: number }> {
  const now = opts.now ?? new Date()
  const cutoff = iso(new Date(now.getTime() - opts.olderThanMs))
  return db.transaction(async (trx) => {
    const stale = trx('jobs').where('status', 'running').where(q => q.whereNull('locked_at').orWhere('locked_at', '<', cutoff))
    const failed = await stale.clone().whereRaw('attempts >= max_attempts').update({
      status: 'failed', error: 'worker stopped during the job', locked_by: null, locked_at: null, finished_at: iso(now), updated_at: iso(now),
    })
    const requeued = await stale.clone().whereRaw('attempts < max_attempts').update({
      status: 'queued', locked_by: null, locked_at: null, run_after: iso(now), updated_at: iso(now),
    })
    return { requeued, failed }
  })
}

/** One job, or null. */
export async function findJob (db: Knex, id: number): Promise<Job<any> | null> {
  const r = await db('jobs').where({ id }).first()
  return r ? toJob(r) : null
}

/** The newest job about a take (for its progress), or null. */
export async function latestJobForTake (db: Knex, takeId: number): Promise<Job<any> | null> {
  const r = await db('jobs').where({ take_id: takeId }).orderBy('id', 'desc').first()
  return r ? toJob(r) : null
}

/** Job kind of a take's analysis (payload `{ takeId }`, row's take_id set). */
export const ANALYSE_TAKE_JOB = 'analyse_take'
