// The home page's lists keep the order their captions promise: "Waiting for review" is oldest
// first (the take that has waited longest comes first); "Your recent takes" newest first.
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Knex } from 'knex'
import { createKnex } from '../../../server/database/knex'
import { migrateLatest } from '../../../server/database/migrations'
import { seedDemoIfEmpty } from '../../../seeds/demo/index'
import { loadHome } from '../../../server/utils/home'

let db: Knex
const now = new Date('2026-03-10T12:00:00Z')

beforeAll(async () => {
  db = createKnex(':memory:')
  await migrateLatest(db)
  await seedDemoIfEmpty(db, { hashPassword: async p => `plain:${p}`, put: async () => {}, now })
}, 60_000)
afterAll(async () => { await db?.destroy() })

async function homeOf(role: 'director' | 'player') {
  // Whoever in the demo has the most takes to look at in that role.
  const rows = await db('memberships as m').join('users as u', 'u.id', 'm.user_id').where('m.role', role)
    .select('u.id', 'u.email', 'u.name', 'u.site_role')
  let best: Awaited<ReturnType<typeof loadHome>> | null = null
  for (const r of rows) {
    const h = await loadHome(db, { id: r.id, email: r.email, name: r.name, siteRole: r.site_role ?? null }, now)
    const n = role === 'director' ? h.toReview.length : h.recent.length
    if (!best || n > (role === 'director' ? best.toReview.length : best.recent.length)) best = h
  }
  return best!
}

describe('home lists', () => {
  it('lists takes waiting for review oldest first', async () => {
    const home = await homeOf('director')
    expect(home.toReview.length).toBeGreaterThanOrEqual(3)
    const times = home.toReview.map(t => Date.parse(t.submittedAt))
    expect(times.every(Number.isFinite)).toBe(true)
    // Non-decreasing times: each take was sent no later than the one after it.
    for (let i = 1; i < times.length; i++) expect(times[i]!).toBeGreaterThanOrEqual(times[i - 1]!)
    expect(times[0]!).toBeLessThan(times.at(-1)!)
  })

  it('lists a player\'s recent takes newest first, with the drift figure carried', async () => {
    const home = await homeOf('player')
    expect(home.recent.length).toBeGreaterThanOrEqual(2)
    const times = home.recent.map(t => Date.parse(t.createdAt))
    for (let i = 1; i < times.length; i++) expect(times[i]!).toBeLessThanOrEqual(times[i - 1]!)
    // The field is always present (null until analysed, or when too few holds give a slope).
    expect(home.recent.every(t => 'driftCentsPerMin' in t)).toBe(true)
  })
})
