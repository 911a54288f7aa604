// Reviews without the server: the hold under a moment, migration 010 on a database that already
// holds reviews, a review saved whole or not at all, and the queue's scope per role.
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Knex } from 'knex'
import { createKnex } from '../../../server/database/knex'
import { MIGRATIONS, migrateLatest, migrationSource } from '../../../server/database/migrations'
import { seedDemoIfEmpty } from '../../../seeds/demo/index'
import { holdIndexAt, holdMidpoint } from '../../../shared/review'
import { ReviewBody, ReviewQueueQuery } from '../../../shared/schemas/review'
import { notePlacementProblem, saveReview } from '../../../server/utils/reviews'
import { reviewQueue } from '../../../server/utils/review-queue'
import { toTake } from '../../../server/utils/takes'

describe('holdIndexAt', () => {
  // Holds as the report lists them: a gap between the second and third (a breath), a hold with
  // no extent (skipped), and touching holds. Each hold covers the half-open interval
  // [start, end): at the instant one hold ends and the next begins, the next one sounds
  // (the usual convention for adjacent time intervals, common practice).
  const holds = [
    { startS: 1.0, endS: 3.0 },
    { startS: 3.0, endS: 5.0 },
    { startS: 5.5, endS: 7.0 },
    { startS: 8.0, endS: 8.0 },
  ]
  it.each([
    [0.5, null], // count-in before the first hold
    [1.0, 0],
    [2.999, 0],
    [3.0, 1], // the second hold has begun
    [5.2, null], // the breath between holds
    [5.5, 2],
    [7.0, null], // the end of the last hold
    [8.0, null], // an empty hold holds nothing
    [Number.NaN, null],
  ])('%s s → %s', (atS, want) => {
    expect(holdIndexAt(holds, atS)).toBe(want)
  })
  it('places a note pinned to a hold at its middle, inside that hold', () => {
    for (const [i, h] of holds.slice(0, 3).entries()) expect(holdIndexAt(holds, holdMidpoint(h))).toBe(i)
  })
  it('has no hold without a report or a moment', () => {
    expect(holdIndexAt(null, 2)).toBeNull()
    expect(holdIndexAt(holds, null)).toBeNull()
  })
})

describe('the review body', () => {
  it('takes a verdict with whole-take and pinned notes, and refuses empty notes and negative moments', () => {
    expect(ReviewBody.parse({ verdict: 'retake', notes: [{ body: ' Again ' }, { atS: 2.5, body: 'x' }] }).notes).toEqual([{ body: 'Again' }, { atS: 2.5, body: 'x' }])
    expect(ReviewBody.safeParse({ verdict: 'approved', notes: [{ body: ' \u202E ' }] }).success).toBe(false)
    expect(ReviewBody.safeParse({ verdict: 'approved', notes: [{ atS: -0.1, body: 'x' }] }).success).toBe(false)
    expect(ReviewBody.safeParse({ verdict: 'fine' }).success).toBe(false)
  })
  it('finds the first note pinned after the end of the take', () => {
    expect(notePlacementProblem([{ body: 'a' }, { atS: 10, body: 'b' }], 10)).toBeNull()
    expect(notePlacementProblem([{ atS: 1, body: 'a' }, { atS: 10.01, body: 'b' }], 10)).toMatchObject({ index: 1, code: 'note_outside_take' })
    expect(notePlacementProblem([{ body: 'a' }, { atS: 1, body: 'b' }], null)).toMatchObject({ index: 1, code: 'no_timeline' })
  })
  it('refuses unknown queue filters and pages out of range', () => {
    expect(ReviewQueueQuery.parse({})).toEqual({ page: 1, pageSize: 20 })
    expect(ReviewQueueQuery.safeParse({ colour: 'blue' }).success).toBe(false)
    expect(ReviewQueueQuery.safeParse({ page: '0' }).success).toBe(false)
    expect(ReviewQueueQuery.safeParse({ pageSize: '101' }).success).toBe(false)
  })
})

describe('migration 010 on a database that already holds reviews', () => {
  it('keeps every review and note, and fills the edit time from the creation time', async () => {
    const db = createKnex(':memory:')
    try {
      // Every other migration first: a database that already ran later ones gets 010 on its own.
      const before = Object.keys(MIGRATIONS).filter(n => n !== '010_review_notes.ts').sort()
      await db.migrate.latest({ migrationSource: { ...migrationSource, getMigrations: async () => before } })
      await seedDemoIfEmpty(db, { hashPassword: async p => `plain:${p}`, put: async () => {}, now: new Date('2026-03-10T12:00:00Z') })
      const notesBefore = await db('review_notes').select('id', 'review_id', 'hold_index', 'body', 'created_at')
      expect(notesBefore.length).toBeGreaterThan(0)
      expect(await migrateLatest(db)).toEqual(['010_review_notes.ts'])
      const after = await db('review_notes').select('id', 'review_id', 'hold_index', 'body', 'created_at', 'updated_at', 'at_s')
      expect(after.map(({ updated_at: _u, at_s: _a, ...rest }) => rest)).toEqual(notesBefore)
      for (const n of after) expect([n.updated_at, n.at_s]).toEqual([n.created_at, null])
      await db.migrate.rollback({ migrationSource })
      expect(await db('review_notes').select('id', 'review_id', 'hold_index', 'body', 'created_at')).toEqual(notesBefore)
    } finally {
      await db.destroy()
    }
  })
})

describe('saving reviews and the queue (demo ensembles)', () => {
  let db: Knex
  const user = async (email: string) => {
    const u = await db('users').where({ email }).first()
    return { id: u.id as number, email, name: u.name as string, siteRole: (u.site_role ?? null) as 'admin' | null }
  }
  beforeAll(async () => {
    db = createKnex(':memory:')
    await migrateLatest(db)
    await seedDemoIfEmpty(db, { hashPassword: async p => `plain:${p}`, put: async () => {}, now: new Date('2026-03-10T12:00:00Z') })
    // The seed queues the analyses; the queue lists analysed takes.
    await db('takes').update({ status: 'analysed' })
  }, 60_000)
  afterAll(async () => { await db?.destroy() })

  it('stores nothing when one note cannot be stored', async () => {
    const leader = await user('aisha.bello@example.org')
    const take = toTake(await db('takes as t').join('users as u', 'u.id', 't.user_id').where('u.email', 'clara.lindqvist@example.org').first('t.*'))
    const reviews = await db('reviews').count({ n: 'id' })
    const notes = await db('review_notes').count({ n: 'id' })
    // The second note breaks the table's NOT NULL rule half-way through the writes.
    const body = { verdict: 'approved' as const, summary: 'ok', notes: [{ body: 'kept?' }, { body: null as unknown as string }] }
    await expect(saveReview(db, leader.id, take, body, [])).rejects.toThrow()
    expect(await db('reviews').count({ n: 'id' })).toEqual(reviews)
    expect(await db('review_notes').count({ n: 'id' })).toEqual(notes)
    expect(await db('audit_log').where('action', 'like', 'review.%').count({ n: 'id' })).toEqual([{ n: 0 }])
  })

  it('lists a leader\'s own section and a director\'s whole ensemble, without reviewed takes or their own', async () => {
    const leader = await user('aisha.bello@example.org')
    const director = await user('helena.marsh@example.org')
    const q = ReviewQueueQuery.parse({ pageSize: '100' })
    const mine = await reviewQueue(db, leader, q)
    const all = await reviewQueue(db, director, q)
    if ('refused' in mine || 'refused' in all) throw new Error('refused')
    expect(mine.items.length).toBeGreaterThan(0)
    expect(new Set(mine.items.map(i => i.section?.name))).toEqual(new Set(['Soprano']))
    expect(mine.items.some(i => i.player.id === leader.id)).toBe(false)
    const reviewed = (await db('reviews').select('take_id')).map(r => r.take_id)
    expect(reviewed.length).toBeGreaterThan(0)
    expect(all.items.some(i => reviewed.includes(i.takeId))).toBe(false)
    const choir = (await db('ensembles').where('name', 'Driftwood Bay Community Choir').first('id')).id
    const expected = await db('takes').where({ ensemble_id: choir }).whereNotIn('id', reviewed).orderBy(['created_at', 'id']).pluck('id')
    expect(all.items.map(i => i.takeId)).toEqual(expected)
    expect(await reviewQueue(db, await user('clara.lindqvist@example.org'), q)).toEqual({ refused: 'not_a_reviewer' })
  })
})
