// The demo scenario: everything it promises is in the database, and the synthesised takes carry
// the deviations it describes, measured with an independent pitch detector (pitchy, McLeod pitch
// method, from the npm registry).
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Knex } from 'knex'
import { PitchDetector } from 'pitchy'
import { createKnex } from '../../../server/database/knex'
import { migrateLatest } from '../../../server/database/migrations'
import { decodeAudio } from '../../../server/analysis/decode'
import { DEMO_SAMPLE_RATE, demoTakeSeed, demoTakeSpec, seedDemo, seedDemoIfEmpty, synthDemoTake } from '../../../seeds/demo/index'
import { DEMO_PASSWORD, TAKES } from '../../../seeds/demo/scenario'
import { loadDrill } from '../../../server/utils/drills'

let db: Knex
const objects = new Map<string, { bytes: Uint8Array, type: string }>()
let result: Awaited<ReturnType<typeof seedDemo>>
const now = new Date('2026-03-10T12:00:00Z')

beforeAll(async () => {
  db = createKnex(':memory:')
  await migrateLatest(db)
  // A stand-in hash keeps the test fast; the server passes nuxt-auth-utils' hashPassword.
  result = (await seedDemoIfEmpty(db, {
    hashPassword: async p => `plain:${p}`,
    put: async (key, bytes, type) => { objects.set(key, { bytes, type }) },
    now,
  }))!
}, 60_000)
afterAll(async () => { await db?.destroy() })

describe('demo seed', () => {
  it('fills an empty database once', async () => {
    expect(result.takes).toBe(TAKES.length)
    expect(await seedDemoIfEmpty(db, { hashPassword: async p => p, put: async () => {} })).toBeNull()
  })

  it('has people in every role, one site admin, a person with two roles, addresses at example.org', async () => {
    const users = await db('users')
    expect(users.every(u => u.email.endsWith('@example.org'))).toBe(true)
    expect(users.every(u => u.password_hash === `plain:${DEMO_PASSWORD}`)).toBe(true)
    expect(users.filter(u => u.site_role === 'admin')).toHaveLength(1)
    const roles = await db('memberships').distinct('role').pluck('role')
    expect(roles.sort()).toEqual(['director', 'player', 'section_leader'])
    const multi = await db('memberships').groupBy('user_id').havingRaw('count(distinct role) > 1').select('user_id')
    expect(multi.length).toBeGreaterThan(0)
    // Section of every membership belongs to the membership's ensemble.
    const wrong = await db('memberships as m').join('sections as s', 's.id', 'm.section_id').whereRaw('s.ensemble_id <> m.ensemble_id')
    expect(wrong).toEqual([])
  })

  it('has a choir and a band with transposing instruments', async () => {
    expect((await db('ensembles').pluck('kind')).sort()).toEqual(['brass_band', 'choir'])
    const instruments = await db('drill_parts').distinct('instrument').pluck('instrument')
    expect(instruments).toEqual(expect.arrayContaining(['cornet-bb', 'tenor-horn-eb', 'baritone-bb-treble', 'trombone', 'eb-bass-treble', 'bb-bass-treble']))
  })

  it('stores drills whose documents load and use several tuning systems', async () => {
    const ids = await db('drills').pluck('id')
    const systems = new Set<string>()
    for (const id of ids) systems.add((await loadDrill(db, id))!.document.system.name)
    expect([...systems].sort()).toEqual(['equal', 'just-common', 'just-root'])
  })

  it('has assignments due this week and one overdue', async () => {
    const due = (await db('assignments').pluck('due_at')).map((d: string) => (Date.parse(d) - now.getTime()) / 86400_000)
    expect(due.filter(d => d < 0)).toHaveLength(1)
    expect(due.filter(d => d > 0 && d <= 7).length).toBeGreaterThanOrEqual(2)
  })

  it('stores every take\'s audio as a WAV, queued with an analysis job, for a part of its drill', async () => {
    const takes = await db('takes')
    expect(takes).toHaveLength(TAKES.length)
    for (const t of takes) {
      const o = objects.get(t.object_key)!
      expect(o.type).toBe('audio/wav')
      expect(o.bytes.byteLength).toBe(t.bytes)
      expect(new TextDecoder().decode(o.bytes.subarray(0, 4))).toBe('RIFF')
      expect(t).toMatchObject({ status: 'queued', sample_rate: DEMO_SAMPLE_RATE, channels: 1 })
      expect(t.duration_s).toBeGreaterThanOrEqual(8)
      expect(t.duration_s).toBeLessThanOrEqual(20)
      expect(t.object_key).not.toContain(t.part) // opaque keys
      expect(await db('drill_parts').where({ drill_id: t.drill_id, name: t.part }).first()).toBeDefined()
      const member = await db('memberships').where({ ensemble_id: t.ensemble_id, user_id: t.user_id }).first()
      expect(member).toBeDefined()
      const job = await db('jobs').where({ take_id: t.id }).first()
      expect(job).toMatchObject({ kind: 'analyse_take', status: 'queued' })
      expect(JSON.parse(job.payload)).toEqual({ takeId: t.id })
    }
  })
})

/** Median pitch (Hz) of the steady middle of each hold, by pitchy's McLeod detector. */
async function measureHolds (i: number) {
  const { spec, holds } = demoTakeSpec(TAKES[i]!, demoTakeSeed(i))
  const audio = await decodeAudio(synthDemoTake(TAKES[i]!, demoTakeSeed(i)).wav)
  const frame = 2048
  const detector = PitchDetector.forFloat32Array(frame)
  return spec.holds.map((h, k) => {
    const from = Math.round((h.startS + 0.4) * audio.sampleRate)
    const to = Math.round((h.endS - 0.2) * audio.sampleRate) - frame
    const found: number[] = []
    for (let s = from; s <= to; s += 256) {
      const [hz, clarity] = detector.findPitch(audio.samples.subarray(s, s + frame), audio.sampleRate)
      if (clarity > 0.9) found.push(hz)
    }
    found.sort((a, b) => a - b)
    const hz = found[Math.floor(found.length / 2)]!
    return { ...holds[k]!, midS: (h.startS + h.endS) / 2, measuredCents: 1200 * Math.log2(hz / holds[k]!.targetHz) }
  })
}

const mean = (xs: number[]) => xs.reduce((a, b) => a + b, 0) / xs.length
const slope = (pts: [number, number][]) => {
  const mx = mean(pts.map(p => p[0]))
  const my = mean(pts.map(p => p[1]))
  return pts.reduce((s, [x, y]) => s + (x - mx) * (y - my), 0) / pts.reduce((s, [x]) => s + (x - mx) ** 2, 0)
}
const takeOf = (person: string, drill: string) => TAKES.findIndex(t => t.person === person && t.drill === drill && t.assignment != null)

describe('demo takes carry the deviations the scenario describes', () => {
  it('the alto sings her thirds about 9 cents higher than her other notes', async () => {
    const holds = await measureHolds(takeOf('june', 'cadence'))
    const thirds = holds.filter(h => h.member === 'third').map(h => h.measuredCents)
    const others = holds.filter(h => h.member !== 'third').map(h => h.measuredCents)
    expect(thirds.length).toBeGreaterThan(0)
    expect(mean(thirds) - mean(others)).toBeGreaterThan(5)
    expect(mean(thirds) - mean(others)).toBeLessThan(13)
  })

  it('a bass sags flat over the take (about −1.3 cents per second)', async () => {
    const holds = await measureHolds(takeOf('ike', 'cadence'))
    const s = slope(holds.map(h => [h.midS, h.measuredCents]))
    expect(s).toBeLessThan(-0.8)
    expect(s).toBeGreaterThan(-1.8)
  })

  it('the cornet plays about 12 cents sharp', async () => {
    const holds = await measureHolds(takeOf('marcus', 'chorale'))
    const m = mean(holds.map(h => h.measuredCents))
    expect(m).toBeGreaterThan(8)
    expect(m).toBeLessThan(16)
  })

  it('measured and intended deviations agree hold by hold within a few cents', async () => {
    for (const [person, drill] of [['june', 'cadence'], ['marcus', 'chorale'], ['clara', 'cadence']] as const) {
      for (const h of await measureHolds(takeOf(person, drill))) expect(Math.abs(h.measuredCents - h.cents)).toBeLessThan(4)
    }
  })
})
