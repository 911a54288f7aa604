import { afterEach, beforeEach, describe, expect, it } from 'vitest'
import type { Knex } from 'knex'
import { createKnex } from '../../../server/database/knex'
import { migrateLatest } from '../../../server/database/migrations'
import { claimJob, completeJob, enqueueJob, failJob, findJob, requeueStaleJobs, retryDelayMs, setJobProgress } from '../../../server/utils/jobs'

let db: Knex
beforeEach(async () => {
  db = createKnex(':memory:')
  await migrateLatest(db)
})
afterEach(async () => { await db.destroy() })

describe('job queue', () => {
  it('claims the oldest due job once, with a lock and an attempt counted', async () => {
    const a = await enqueueJob(db, 'analyse', { takeId: 1 })
    const b = await enqueueJob(db, 'analyse', { takeId: 2 })
    await enqueueJob(db, 'analyse', { takeId: 3 }, { runAfter: new Date(Date.now() + 60_000) })
    const first = await claimJob(db, 'w1')
    expect(first).toMatchObject({ id: a, status: 'running', lockedBy: 'w1', attempts: 1, payload: { takeId: 1 } })
    const second = await claimJob(db, 'w2')
    expect(second?.id).toBe(b)
    expect(await claimJob(db, 'w3')).toBeNull() // the third is not due yet
  })

  it('filters by kind', async () => {
    await enqueueJob(db, 'mail', {})
    const id = await enqueueJob(db, 'analyse', {})
    expect((await claimJob(db, 'w', { kinds: ['analyse'] }))?.id).toBe(id)
    expect(await claimJob(db, 'w', { kinds: ['analyse'] })).toBeNull()
  })

  it('records progress and completion only for the worker holding the lock', async () => {
    const id = await enqueueJob(db, 'analyse', {})
    await claimJob(db, 'w1')
    expect(await setJobProgress(db, id, 'w2', 0.5)).toBe(false)
    expect(await setJobProgress(db, id, 'w1', 0.5)).toBe(true)
    expect((await findJob(db, id))?.progress).toBe(0.5)
    expect(await setJobProgress(db, id, 'w1', Number.NaN)).toBe(true) // never stores NaN
    expect((await findJob(db, id))?.progress).toBe(0)
    expect(await completeJob(db, id, 'w1', { analysisId: 7 })).toBe(true)
    expect(await findJob(db, id)).toMatchObject({ status: 'done', progress: 1, result: { analysisId: 7 }, lockedBy: null })
    expect(await completeJob(db, id, 'w1')).toBe(false)
  })

  it('retries with backoff, then fails for good after max attempts', async () => {
    const id = await enqueueJob(db, 'analyse', {}, { maxAttempts: 2 })
    const t0 = new Date()
    await claimJob(db, 'w1', { now: t0 })
    expect(await failJob(db, id, 'w1', 'decoder crashed', { now: t0 })).toBe('requeued')
    const j = await findJob(db, id)
    expect(j?.status).toBe('queued')
    expect(Date.parse(j!.runAfter) - t0.getTime()).toBe(retryDelayMs(1))
    expect(await claimJob(db, 'w1', { now: t0 })).toBeNull() // not due before the delay
    const later = new Date(t0.getTime() + retryDelayMs(1))
    expect((await claimJob(db, 'w1', { now: later }))?.attempts).toBe(2)
    expect(await failJob(db, id, 'w1', 'decoder crashed again', { now: later })).toBe('failed')
    expect(await findJob(db, id)).toMatchObject({ status: 'failed', error: 'decoder crashed again' })
  })

  it('fails at once when retry is off (input that can never be analysed)', async () => {
    const id = await enqueueJob(db, 'analyse', {})
    await claimJob(db, 'w1')
    expect(await failJob(db, id, 'w1', 'silent', { retry: false })).toBe('failed')
  })

  it('puts stale locks back in the queue, and fails those out of attempts', async () => {
    const t0 = new Date(Date.now() - 10 * 60_000)
    const a = await enqueueJob(db, 'analyse', {}, { maxAttempts: 3, runAfter: t0 })
    const b = await enqueueJob(db, 'analyse', {}, { maxAttempts: 1, runAfter: t0 })
    await claimJob(db, 'dead', { now: t0 })
    await claimJob(db, 'dead', { now: t0 })
    const fresh = await enqueueJob(db, 'analyse', {})
    await claimJob(db, 'alive')
    expect(await requeueStaleJobs(db, { olderThanMs: 5 * 60_000 })).toEqual({ requeued: 1, failed: 1 })
    expect((await findJob(db, a))?.status).toBe('queued')
    expect((await findJob(db, b))?.status).toBe('failed')
    expect((await findJob(db, fresh))?.status).toBe('running')
  })

  it.each([[1, 5000], [2, 20_000], [3, 80_000], [10, 600_000]])('retry delay after %i attempts is %i ms', (n, ms) => {
    expect(retryDelayMs(n)).toBe(ms)
  })
})
