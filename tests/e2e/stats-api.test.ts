// GET /api/ensembles/:id/stats and /holds.csv against figures computed here from the per-take
// reports (GET /api/takes/:id), not from the server's own queries. The data is a small volume
// ensemble (scripts/seed-volume.ts: stored measurements scored by the real scorer, with wrong
// notes and unfound holds among them).
import { mkdtempSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import Database from 'better-sqlite3'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { startApp, type App } from './harness'
import { seedVolume, VOLUME_DIRECTOR } from '../../scripts/seed-volume'
import { dbQuery } from './takes-helpers'

interface Hold { index: number, member: string | null, note: string, targetHz: number, detectedHz: number | null, centsFromTarget: number | null, centsFromEqual: number | null, withinTolerance: boolean | null, reasonCode?: string | null }
interface Take { id: number, createdAt: string, part: string, drill: { id: number, title: string }, player: { id: number, name: string }, report: { holds: Hold[], tolerance: number } }

let app: App
let ensembleId: number
let director: string
let takes: Take[] = []
let sections: Array<{ id: number, name: string }>
const members = new Map<number, { section: string, sectionId: number, role: string, email: string }>()

/**
 * Quantile by linear interpolation between closest ranks with rank x = p(N − 1) + 1 (the "C = 1"
 * variant in Wikipedia's "Percentile" article; Hyndman & Fan 1996 type 7), written out here
 * independently of shared/stats.ts.
 */
function quantile(values: number[], p: number): number {
  const v = [...values].sort((a, b) => a - b)
  const x = p * (v.length - 1) + 1
  const k = Math.floor(x)
  const d = x - k
  if (k >= v.length) return v[v.length - 1]!
  return v[k - 1]! + d * (v[k]! - v[k - 1]!)
}
/** Figures are rounded to 0.01: equal within half of that. */
const near = (actual: number, wanted: number) => expect(Math.abs(actual - wanted)).toBeLessThanOrEqual(0.005 + 1e-9)
/** Records of an RFC 4180 CSV text (quoted fields may hold commas, quotes and line breaks). */
function parseCsv(text: string): string[][] {
  const out: string[][] = []
  let rec: string[] = []
  let field = ''
  let quoted = false
  for (let i = 0; i < text.length; i++) {
    const c = text[i]!
    if (quoted) {
      if (c === '"' && text[i + 1] === '"') { field += '"'; i++ } else if (c === '"') quoted = false
      else field += c
    } else if (c === '"') quoted = true
    else if (c === ',') { rec.push(field); field = '' } else if (c === '\r' && text[i + 1] === '\n') { rec.push(field); out.push(rec); rec = []; field = ''; i++ } else field += c
  }
  if (field || rec.length) { rec.push(field); out.push(rec) }
  return out
}
const mean = (xs: number[]) => xs.reduce((s, x) => s + x, 0) / xs.length
/** Scored = measured, on the expected note (not a wrong note), with a deviation. */
const scored = (h: Hold) => h.centsFromTarget != null && h.reasonCode !== 'wrong_note' && Math.abs(h.centsFromEqual ?? 0) <= 100

beforeAll(async () => {
  const dir = mkdtempSync(join(tmpdir(), 'driftline-stats-'))
  const file = join(dir, 'driftline.sqlite')
  await seedVolume({ file, players: 16, takesPerPlayer: 6 })
  // One take withdrawn: it must count nowhere.
  const raw = new Database(file)
  raw.prepare('update takes set withdrawn_at = ? where id = (select min(id) + 3 from takes)').run(new Date().toISOString())
  raw.close()
  app = await startApp({ dir, seed: false })
  director = await app.login(VOLUME_DIRECTOR)
  ensembleId = dbQuery<{ id: number }>(app, 'select id from ensembles')[0]!.id
  sections = dbQuery(app, 'select id, name from sections where ensemble_id = ? order by position', ensembleId)
  for (const m of dbQuery<{ user_id: number, section: string, section_id: number, role: string, email: string }>(app,
    'select m.user_id, s.name as section, m.section_id, m.role, u.email from memberships m join users u on u.id = m.user_id left join sections s on s.id = m.section_id where m.ensemble_id = ?', ensembleId)) {
    members.set(m.user_id, { section: m.section, sectionId: m.section_id, role: m.role, email: m.email })
  }
  const ids = dbQuery<{ id: number }>(app, 'select id from takes order by id').map(r => r.id)
  for (const id of ids) {
    const t = await (await app.fetch(`/api/takes/${id}`, { cookie: director })).json() as Take & { withdrawnAt: string | null }
    if (!t.withdrawnAt) takes.push(t)
  }
}, 120_000)
afterAll(async () => { await app?.stop() })

const stats = async (query: string, cookie = director) => app.fetch(`/api/ensembles/${ensembleId}/stats${query}`, { cookie })

function expected(selected: Take[]) {
  const holds = selected.flatMap(t => t.report.holds.filter(scored).map(h => ({ t, h })))
  const byMember = new Map<string, number[]>()
  for (const { h } of holds) if (h.member) byMember.set(h.member, [...(byMember.get(h.member) ?? []), h.centsFromTarget!])
  return { holds, byMember }
}

describe('GET /api/ensembles/:id/stats', () => {
  it('counts every analysed, not withdrawn take and every scored hold once', async () => {
    const body = await (await stats('')).json()
    const { holds } = expected(takes)
    expect(body.takes).toBe(takes.length)
    expect(body.holds).toBe(holds.length)
    // The seed puts wrong notes in; none may count.
    const wrong = takes.flatMap(t => t.report.holds).filter(h => h.detectedHz != null && !scored(h))
    expect(wrong.length).toBeGreaterThan(0)
  })

  it('gives each chord member its mean, median and quartiles (Hyndman & Fan type 7)', async () => {
    const body = await (await stats('')).json()
    const { byMember } = expected(takes)
    expect(body.members.map((m: { member: string }) => m.member).sort()).toEqual([...byMember.keys()].sort())
    for (const m of body.members) {
      const v = byMember.get(m.member)!
      expect(m.n).toBe(v.length)
      near(m.meanCents, mean(v))
      near(m.medianCents, quantile(v, 0.5))
      near(m.q1, quantile(v, 0.25))
      near(m.q3, quantile(v, 0.75))
      near(m.min, Math.min(...v))
      near(m.max, Math.max(...v))
    }
  })

  it('gives each player their takes, holds, mean deviations and share within tolerance', async () => {
    const body = await (await stats('')).json()
    for (const p of body.players) {
      const mine = takes.filter(t => t.player.id === p.userId)
      const hs = mine.flatMap(t => t.report.holds.filter(scored).map(h => ({ h, tol: t.report.tolerance })))
      expect(p.takes).toBe(mine.length)
      expect(p.holds).toBe(hs.length)
      expect(p.section).toBe(members.get(p.userId)!.section)
      near(p.meanAbsCents, mean(hs.map(x => Math.abs(x.h.centsFromTarget!))))
      near(p.meanCents, mean(hs.map(x => x.h.centsFromTarget!)))
      near(p.withinShare, hs.filter(x => Math.abs(x.h.centsFromTarget!) <= x.tol).length / hs.length)
    }
    expect(body.players.length).toBe(new Set(takes.map(t => t.player.id)).size)
  })

  it('groups by ISO week starting on Monday, UTC (ISO 8601, common practice)', async () => {
    const body = await (await stats('')).json()
    const weekOf = (iso: string) => {
      const d = new Date(iso)
      const monday = new Date(Date.UTC(d.getUTCFullYear(), d.getUTCMonth(), d.getUTCDate() - ((d.getUTCDay() + 6) % 7)))
      return monday.toISOString().slice(0, 10)
    }
    const weeks = new Map<string, Take[]>()
    for (const t of takes) weeks.set(weekOf(t.createdAt), [...(weeks.get(weekOf(t.createdAt)) ?? []), t])
    expect(body.weeks.map((w: { weekStart: string }) => w.weekStart)).toEqual([...weeks.keys()].sort())
    for (const w of body.weeks) {
      expect(new Date(`${w.weekStart}T00:00:00Z`).getUTCDay()).toBe(1)
      const ts = weeks.get(w.weekStart)!
      const hs = ts.flatMap(t => t.report.holds.filter(scored))
      expect(w.takes).toBe(ts.length)
      near(w.meanAbsCents, mean(hs.map(h => Math.abs(h.centsFromTarget!))))
    }
  })

  it('lists the holds most often out of tolerance with their share and mean', async () => {
    const body = await (await stats('')).json()
    expect(body.worstHolds.length).toBeGreaterThan(0)
    let last = Infinity
    for (const w of body.worstHolds) {
      const hs = takes.filter(t => t.drill.id === w.drillId && t.part === w.part)
        .flatMap(t => t.report.holds.filter(h => h.index === w.chordIndex && scored(h)).map(h => ({ h, tol: t.report.tolerance })))
      expect(w.n).toBe(hs.length)
      near(w.outShare, hs.filter(x => Math.abs(x.h.centsFromTarget!) > x.tol).length / hs.length)
      near(w.meanCents, mean(hs.map(x => x.h.centsFromTarget!)))
      const sung = takes.filter(t => t.drill.id === w.drillId && t.part === w.part && t.report.holds.some(h => h.index === w.chordIndex && scored(h)))
      const sectionNames = [...new Set(sung.map(t => members.get(t.player.id)!.section).filter(Boolean))].sort((a, b) => a.localeCompare(b))
      expect(w.sections).toEqual(sectionNames)
      expect(w.outShare).toBeLessThanOrEqual(last)
      last = w.outShare
    }
  })

  it('filters by section, player and drill', async () => {
    const s = sections[2]!
    const body = await (await stats(`?sectionId=${s.id}`)).json()
    const inSection = takes.filter(t => members.get(t.player.id)!.sectionId === s.id)
    expect(body.takes).toBe(inSection.length)
    expect(body.holds).toBe(expected(inSection).holds.length)
    const drillId = takes[0]!.drill.id
    const byDrill = await (await stats(`?drillId=${drillId}`)).json()
    expect(byDrill.takes).toBe(takes.filter(t => t.drill.id === drillId).length)
  })

  it('re-scores the stored measurements under another system, A4 and tolerance', async () => {
    const body = await (await stats('?system=equal&a4=442&tolerance=5')).json()
    const reports = await Promise.all(takes.map(async (t) => {
      const r = await app.fetch(`/api/takes/${t.id}/rescore`, { method: 'POST', cookie: director, headers: { 'content-type': 'application/json' }, body: JSON.stringify({ system: { name: 'equal' }, a4: 442, tolerance: 5 }) })
      return (await r.json()).report as { holds: Hold[] }
    }))
    const hs = reports.flatMap(r => r.holds.filter(scored))
    expect(body.holds).toBe(hs.length)
    const all = hs.map(h => h.centsFromTarget!)
    const overall = body.players.reduce((s: number, p: { meanCents: number, holds: number }) => s + p.meanCents * p.holds, 0) / body.holds
    expect(overall).toBeCloseTo(mean(all), 1)
    const within = body.players.reduce((s: number, p: { withinShare: number, holds: number }) => s + p.withinShare * p.holds, 0)
    expect(within).toBeCloseTo(all.filter(c => Math.abs(c) <= 5).length, -1)
  })

  it('refuses bad filters with a message naming the field', async () => {
    for (const [q, field] of [['?colour=blue', ''], ['?from=2026-05-01&to=2026-04-01', 'to'], ['?system=scala', 'scala'], [`?system=scala&scala=${encodeURIComponent('not a scale\nat all\n')}`, 'scala'], [`?system=scala&scala=${'1'.repeat(4_001)}`, 'scala'], ['?seventh=harmonic', 'seventh'], ['?a4=500', 'a4'], ['?sectionId=1e1', 'sectionId']] as const) {
      const r = await stats(q)
      expect(r.status, q).toBe(400)
      const text = await r.text()
      if (field) expect(text, q).toContain(field)
      expect(text).not.toMatch(/undefined|\[object Object\]/)
    }
  })

  it('shows a section leader their section only and a player themselves only', async () => {
    const leaderId = [...members].find(([, m]) => m.role === 'section_leader')![0]
    const leader = members.get(leaderId)!
    const cookie = await app.login(leader.email)
    const own = await (await stats('', cookie)).json()
    const inSection = takes.filter(t => members.get(t.player.id)!.sectionId === leader.sectionId)
    expect(own.takes).toBe(inSection.length)
    const other = sections.find(s => s.id !== leader.sectionId)!
    expect((await stats(`?sectionId=${other.id}`, cookie)).status).toBe(403)
    const stranger = [...members].find(([, m]) => m.sectionId === other.id)![0]
    expect((await stats(`?userId=${stranger}`, cookie)).status).toBe(403)

    const playerId = [...members].find(([, m]) => m.role === 'player')![0]
    const pc = await app.login(members.get(playerId)!.email)
    const mine = await (await stats('', pc)).json()
    expect(mine.takes).toBe(takes.filter(t => t.player.id === playerId).length)
    expect(mine.players.map((p: { userId: number }) => p.userId)).toEqual(mine.takes ? [playerId] : [])
    expect((await stats(`?userId=${leaderId}`, pc)).status).toBe(403)
    expect((await stats('?drillId=999999')).status).toBe(404)

    // A take the player withdraws leaves the figures at once (nothing stale is served).
    const before = await (await stats('')).json()
    const take = takes.find(t => t.player.id === playerId)!
    expect((await app.fetch(`/api/takes/${take.id}/withdraw`, { method: 'POST', cookie: pc, headers: { 'content-type': 'application/json' }, body: '{}' })).status).toBe(200)
    const after = await (await stats('')).json()
    expect(after.takes).toBe(before.takes - 1)
    expect((await app.fetch(`/api/takes/${take.id}/restore`, { method: 'POST', cookie: director, headers: { 'content-type': 'application/json' }, body: '{}' })).status).toBe(200)
    expect((await (await stats('')).json()).takes).toBe(before.takes)
    expect((await app.fetch(`/api/ensembles/${ensembleId + 1000}/stats`, { cookie: director })).status).toBe(404)
  })
})

describe('GET /api/ensembles/:id/holds.csv', () => {
  it('has the documented header and one row per scored hold, matching the reports', async () => {
    const r = await app.fetch(`/api/ensembles/${ensembleId}/holds.csv`, { cookie: director })
    expect(r.status).toBe(200)
    expect(r.headers.get('content-type')).toMatch(/^text\/csv; charset=utf-8/)
    const text = await r.text()
    expect(text.split('\r\n')[0]).toBe('take_id,submitted_at,player,section,drill,part,hold,note,member,target_hz,detected_hz,cents_from_target,cents_from_equal,within_tolerance')
    const records = parseCsv(text)
    const { holds } = expected(takes)
    expect(records.length - 1).toBe(holds.length)
    const rows = new Map(records.slice(1).map(f => [`${f[0]}|${f[6]}`, f]))
    for (const { t, h } of holds) {
      const f = rows.get(`${t.id}|${h.index + 1}`)!
      expect(f, `take ${t.id} hold ${h.index + 1}`).toBeDefined()
      expect(f[1]).toBe(t.createdAt)
      expect(f[2]).toBe(t.player.name)
      expect(f[4]).toBe(t.drill.title)
      expect(f[5]).toBe(t.part)
      expect(f[7]).toBe(h.note)
      expect(Number(f[9])).toBeCloseTo(h.targetHz, 3)
      expect(Number(f[11])).toBeCloseTo(h.centsFromTarget!, 3)
      expect(f[13]).toBe(String(h.withinTolerance))
    }
  })

  it('follows the same filters and access rules as the figures', async () => {
    const s = sections[1]!
    const r = await app.fetch(`/api/ensembles/${ensembleId}/holds.csv?sectionId=${s.id}`, { cookie: director })
    const n = parseCsv(await r.text()).length - 1
    expect(n).toBe(expected(takes.filter(t => members.get(t.player.id)!.sectionId === s.id)).holds.length)
    const playerId = [...members].find(([, m]) => m.role === 'player' && m.sectionId !== s.id)![0]
    const pc = await app.login(members.get(playerId)!.email)
    expect((await app.fetch(`/api/ensembles/${ensembleId}/holds.csv?sectionId=${s.id}`, { cookie: pc })).status).toBe(403)
    expect((await app.fetch(`/api/ensembles/${ensembleId}/holds.csv`)).status).toBe(401)
  })
})

describe('re-scoring after a drill is edited', () => {
  // Runs last: it saves a new version of one drill. A take is re-scored against the drill as it
  // was when the take was recorded, so moving the drill's own A4 afterwards changes nothing.
  it('uses the version each take was recorded against', async () => {
    const query = '?system=equal'
    const before = await (await stats(query)).json()
    const drillId = takes[0]!.drill.id
    const drill = await (await app.fetch(`/api/drills/${drillId}`, { cookie: director })).json() as { version: number, document: { a4: number } }
    const put = await app.fetch(`/api/drills/${drillId}`, {
      method: 'PUT', cookie: director, headers: { 'content-type': 'application/json' },
      body: JSON.stringify({ document: { ...drill.document, a4: drill.document.a4 === 415 ? 440 : 415 }, version: drill.version }),
    })
    expect(put.status).toBe(200)
    const after = await (await stats(query)).json()
    expect(after.holds).toBe(before.holds)
    expect(after.members).toEqual(before.members)
    expect(after.players).toEqual(before.players)
  })
})
