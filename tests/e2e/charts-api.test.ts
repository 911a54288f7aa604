// GET /api/ensembles/:id/charts and /charts/choices against figures computed here from the
// per-take reports (GET /api/takes/:id) and the memberships, not from the server's own queries.
// The data is a small volume ensemble (scripts/seed-volume.ts: stored measurements scored by the
// real scorer, with wrong notes and unfound holds among them) plus two assignments added here.
import { mkdtempSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import Database from 'better-sqlite3'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { startApp, type App } from './harness'
import { seedVolume, VOLUME_DIRECTOR } from '../../scripts/seed-volume'
import { dbQuery } from './takes-helpers'
import { recordAssignees } from './charts-helpers'

interface Hold { index: number, member: string | null, centsFromTarget: number | null, centsFromEqual: number | null, withinTolerance: boolean | null, reasonCode?: string | null }
interface Take { id: number, createdAt: string, part: string, drill: { id: number }, player: { id: number }, report: { holds: Hold[], tolerance: number, summary: { driftCentsPerMin: number | null } } }
interface Member { userId: number, sectionId: number, section: string, role: string, email: string, name: string }

let app: App
let ensembleId: number
let director: string
const takes: Take[] = []
const members = new Map<number, Member>()
let sections: Array<{ id: number, name: string }>
const assignments = { all: 0, section: 0 }

/** Figures are rounded to 0.01: equal within half of that. */
const near = (actual: number | null, wanted: number) => expect(Math.abs((actual ?? Number.NaN) - wanted)).toBeLessThanOrEqual(0.005 + 1e-9)
const mean = (xs: number[]) => xs.reduce((s, x) => s + x, 0) / xs.length
/** Scored = measured, on the expected note (not a wrong note: within 100 ¢ of equal temperament), with a deviation. */
const scored = (h: Hold) => h.centsFromTarget != null && h.reasonCode !== 'wrong_note' && Math.abs(h.centsFromEqual ?? 0) <= 100

beforeAll(async () => {
  const dir = mkdtempSync(join(tmpdir(), 'driftline-charts-'))
  const file = join(dir, 'driftline.sqlite')
  await seedVolume({ file, players: 16, takesPerPlayer: 5 })
  // Two assignments: one for everyone, one for the second section; some takes answer them, and
  // one take for the first is withdrawn (a withdrawn take is not a take sent).
  const raw = new Database(file)
  const ens = raw.prepare('select id from ensembles').get() as { id: number }
  const secs = raw.prepare('select id from sections where ensemble_id = ? order by position').all(ens.id) as Array<{ id: number }>
  const drill = raw.prepare('select id from drills where ensemble_id = ? order by id limit 1').get(ens.id) as { id: number }
  const ins = raw.prepare('insert into assignments (ensemble_id, drill_id, section_id, title, due_at, created_at, updated_at) values (?, ?, ?, ?, ?, ?, ?)')
  const now = new Date().toISOString()
  assignments.all = Number(ins.run(ens.id, drill.id, null, 'Whole choir: cadence', '2026-03-09T18:00:00.000Z', now, now).lastInsertRowid)
  assignments.section = Number(ins.run(ens.id, drill.id, secs[1]!.id, 'Second section: cadence', null, now, now).lastInsertRowid)
  recordAssignees(raw, ens.id, [[assignments.all, null], [assignments.section, secs[1]!.id]])
  const firstTakes = raw.prepare('select min(t.id) as id, t.user_id from takes t group by t.user_id order by t.user_id').all() as Array<{ id: number, user_id: number }>
  firstTakes.slice(0, 6).forEach(t => raw.prepare('update takes set assignment_id = ? where id = ?').run(assignments.all, t.id))
  raw.prepare('update takes set withdrawn_at = ? where id = ?').run(now, firstTakes[5]!.id)
  const second = raw.prepare('select t.id from takes t join memberships m on m.user_id = t.user_id where m.section_id = ? order by t.id desc limit 1').get(secs[1]!.id) as { id: number }
  raw.prepare('update takes set assignment_id = ? where id = ?').run(assignments.section, second.id)
  raw.close()

  app = await startApp({ dir, seed: false })
  director = await app.login(VOLUME_DIRECTOR)
  ensembleId = ens.id
  sections = dbQuery(app, 'select id, name from sections where ensemble_id = ? order by position', ensembleId)
  for (const m of dbQuery<{ user_id: number, section: string, section_id: number, role: string, email: string, name: string }>(app,
    'select m.user_id, s.name as section, m.section_id, m.role, u.email, u.name from memberships m join users u on u.id = m.user_id left join sections s on s.id = m.section_id where m.ensemble_id = ?', ensembleId)) {
    members.set(m.user_id, { userId: m.user_id, section: m.section, sectionId: m.section_id, role: m.role, email: m.email, name: m.name })
  }
  for (const { id } of dbQuery<{ id: number }>(app, 'select id from takes order by id')) {
    const t = await (await app.fetch(`/api/takes/${id}`, { cookie: director })).json() as Take & { withdrawnAt: string | null }
    if (!t.withdrawnAt) takes.push(t)
  }
}, 120_000)
afterAll(async () => { await app?.stop() })

const charts = (query: string, cookie = director) => app.fetch(`/api/ensembles/${ensembleId}/charts${query}`, { cookie })
const singers = () => [...members.values()].filter(m => m.role !== 'director')

describe('GET /api/ensembles/:id/charts', () => {
  it('gives one player’s takes with their means, share within tolerance, members and drift as analysed', async () => {
    const player = singers().find(m => m.role === 'player')!
    const body = await (await charts(`?userId=${player.userId}`)).json()
    const mine = takes.filter(t => t.player.id === player.userId).sort((a, b) => a.createdAt.localeCompare(b.createdAt) || a.id - b.id)
    expect(body.takes.map((t: { takeId: number }) => t.takeId)).toEqual(mine.map(t => t.id))
    for (const [i, t] of mine.entries()) {
      const got = body.takes[i]
      const hs = t.report.holds.filter(scored)
      expect(got.holds).toBe(hs.length)
      near(got.meanCents, mean(hs.map(h => h.centsFromTarget!)))
      near(got.meanAbsCents, mean(hs.map(h => Math.abs(h.centsFromTarget!))))
      near(got.withinShare, hs.filter(h => Math.abs(h.centsFromTarget!) <= t.report.tolerance).length / hs.length)
      const byMember = new Map<string, number[]>()
      for (const h of hs) if (h.member) byMember.set(h.member, [...(byMember.get(h.member) ?? []), h.centsFromTarget!])
      expect(Object.keys(got.members).sort()).toEqual([...byMember.keys()].sort())
      for (const [m, v] of byMember) near(got.members[m], mean(v))
      if (t.report.summary.driftCentsPerMin == null) expect(got.driftCentsPerMin).toBeNull()
      else near(got.driftCentsPerMin, t.report.summary.driftCentsPerMin)
    }
  })

  // A Scala file of a 12-note 5-limit just scale (the ratios 16/15, 9/8, 6/5, 5/4, 4/3, 45/32, 3/2,
  // 8/5, 5/3, 9/5, 15/8: the common practice "just major/minor" set; format after the Scala .scl
  // specification: description, count, one pitch per line, the octave last).
  const JUST_SCL = '! just12.scl\nJust twelve, 5-limit\n 12\n!\n16/15\n9/8\n6/5\n5/4\n4/3\n45/32\n3/2\n8/5\n5/3\n9/5\n15/8\n2/1\n'
  for (const [label, query, system] of [
    ['Pythagorean at A4 = 442', 'system=pythagorean&a4=442', { name: 'pythagorean' }],
    ['a Scala scale', `system=scala&scala=${encodeURIComponent(JUST_SCL)}`, { name: 'scala', scala: JUST_SCL }],
  ] as const) {
    it(`re-fits each take’s drift under ${label}, as the take’s own re-score does`, async () => {
      const player = singers().find(m => m.role === 'player')!
      const body = await (await charts(`?userId=${player.userId}&${query}`)).json()
      const mine = takes.filter(t => t.player.id === player.userId).sort((a, b) => a.createdAt.localeCompare(b.createdAt) || a.id - b.id)
      expect(body.takes.map((t: { takeId: number }) => t.takeId)).toEqual(mine.map(t => t.id))
      let moved = 0
      for (const [i, t] of mine.entries()) {
        const res = await app.fetch(`/api/takes/${t.id}/rescore`, { method: 'POST', cookie: director, headers: { 'content-type': 'application/json' }, body: JSON.stringify({ system, ...(query.includes('a4=442') ? { a4: 442 } : {}) }) })
        expect(res.status).toBe(200)
        const want = (await res.json()).report.summary.driftCentsPerMin as number | null
        const got = body.takes[i].driftCentsPerMin
        if (want == null) expect(got).toBeNull()
        else near(got, want)
        if (want != null && t.report.summary.driftCentsPerMin != null && Math.abs(want - t.report.summary.driftCentsPerMin) > 0.01) moved++
      }
      // Targets that move from chord to chord change the slope: the figure is not the analysed one.
      expect(moved).toBeGreaterThan(0)
    })
  }

  it('gives the drift within takes by ISO week: the mean of the week’s takes whose drift was told', async () => {
    // ISO 8601 weeks start on Monday (common practice); the week of a take is that of its sending, in UTC.
    const mondayOf = (iso: string) => {
      const d = new Date(iso)
      d.setUTCHours(0, 0, 0, 0)
      d.setUTCDate(d.getUTCDate() - ((d.getUTCDay() + 6) % 7))
      return d.toISOString().slice(0, 10)
    }
    const want = new Map<string, number[]>()
    for (const t of takes) {
      const drift = t.report.summary.driftCentsPerMin
      if (drift != null) want.set(mondayOf(t.createdAt), [...(want.get(mondayOf(t.createdAt)) ?? []), drift])
    }
    const body = await (await charts('')).json()
    expect(body.weeks.map((w: { weekStart: string }) => w.weekStart)).toEqual([...want.keys()].sort())
    for (const w of body.weeks) {
      const v = want.get(w.weekStart)!
      expect(w.takes).toBe(v.length)
      near(w.driftCentsPerMin, mean(v))
    }
  })

  it('gives a section’s hold × player grid: each player’s mean on each hold over their takes', async () => {
    const s = sections[2]!
    const body = await (await charts(`?sectionId=${s.id}`)).json()
    const inSection = takes.filter(t => members.get(t.player.id)!.sectionId === s.id)
    const want = new Map<string, number[]>()
    for (const t of inSection) for (const h of t.report.holds.filter(scored)) {
      const k = `${t.drill.id}:${h.index}:${t.part}:${t.player.id}`
      want.set(k, [...(want.get(k) ?? []), h.centsFromTarget!])
    }
    expect(body.grid.length).toBe(want.size)
    for (const c of body.grid) {
      const v = want.get(`${c.drillId}:${c.chordIndex}:${c.part}:${c.userId}`)!
      expect(c.n).toBe(v.length)
      near(c.meanCents, mean(v))
    }
    // Per-take series are one player's only: a section's would be every take of it.
    expect(body.takes).toEqual([])
  })

  it('sets the sections side by side with their players, takes, holds and means', async () => {
    const body = await (await charts('')).json()
    expect(body.grid).toEqual([])
    expect(body.sections.map((x: { section: string }) => x.section)).toEqual(sections.map(x => x.name).filter(n => takes.some(t => members.get(t.player.id)!.section === n)))
    for (const x of body.sections) {
      const ts = takes.filter(t => members.get(t.player.id)!.section === x.section)
      const hs = ts.flatMap(t => t.report.holds.filter(scored).map(h => ({ h, tol: t.report.tolerance })))
      expect(x.sectionId).toBe(sections.find(s => s.name === x.section)!.id)
      expect(x.takes).toBe(ts.length)
      expect(x.players).toBe(new Set(ts.map(t => t.player.id)).size)
      expect(x.holds).toBe(hs.length)
      near(x.meanCents, mean(hs.map(y => y.h.centsFromTarget!)))
      near(x.meanAbsCents, mean(hs.map(y => Math.abs(y.h.centsFromTarget!))))
      near(x.withinShare, hs.filter(y => Math.abs(y.h.centsFromTarget!) <= y.tol).length / hs.length)
    }
  })

  it('re-scores under the tolerance asked for', async () => {
    const s = sections[0]!
    const body = await (await charts(`?sectionId=${s.id}&tolerance=3`)).json()
    const hs = takes.filter(t => members.get(t.player.id)!.sectionId === s.id).flatMap(t => t.report.holds.filter(scored))
    near(body.sections[0].withinShare, hs.filter(h => Math.abs(h.centsFromTarget!) <= 3).length / hs.length)
  })

  it('counts participation per assignment and names who has not sent a take (a withdrawn take is not one)', async () => {
    const body = await (await charts('')).json()
    const sent = (assignmentId: number) => new Set(dbQuery<{ user_id: number }>(app, 'select distinct user_id from takes where assignment_id = ? and withdrawn_at is null', assignmentId).map(r => r.user_id))
    const all = body.participation.find((p: { assignmentId: number }) => p.assignmentId === assignments.all)
    const done = sent(assignments.all)
    expect(done.size).toBe(5)
    expect(all.expected).toBe(singers().length)
    expect(all.submitted).toBe(5)
    expect(all.missing.map((p: { userId: number }) => p.userId).sort((a: number, b: number) => a - b)).toEqual(singers().filter(m => !done.has(m.userId)).map(m => m.userId).sort((a, b) => a - b))
    const sec = body.participation.find((p: { assignmentId: number }) => p.assignmentId === assignments.section)
    expect(sec.expected).toBe(singers().filter(m => m.sectionId === sections[1]!.id).length)
    expect(sec.submitted).toBe(1)
    // A section leader of another section sees the assignment for everyone, counted over their section only.
    const leader = singers().find(m => m.role === 'section_leader' && m.sectionId === sections[0]!.id)!
    const mine = await (await charts('', await app.login(leader.email))).json()
    expect(mine.participation.map((p: { assignmentId: number }) => p.assignmentId)).toEqual([assignments.all])
    expect(mine.participation[0].expected).toBe(singers().filter(m => m.sectionId === sections[0]!.id).length)
  })

  it('keeps each role to what it may see', async () => {
    const leader = singers().find(m => m.role === 'section_leader' && m.sectionId === sections[0]!.id)!
    const player = singers().find(m => m.role === 'player' && m.sectionId === sections[1]!.id)!
    const leaderCookie = await app.login(leader.email)
    const playerCookie = await app.login(player.email)
    expect((await charts(`?sectionId=${sections[1]!.id}`, leaderCookie)).status).toBe(403)
    expect((await charts(`?userId=${player.userId}`, leaderCookie)).status).toBe(403)
    expect((await charts(`?userId=${leader.userId}`, playerCookie)).status).toBe(403)
    // Without filters a section leader gets their section, a player themselves.
    const own = await (await charts('', leaderCookie)).json()
    expect(own.sections.map((x: { section: string }) => x.section)).toEqual([leader.section])
    const me = await (await charts('', playerCookie)).json()
    expect(new Set(me.takes.map((t: { userId: number }) => t.userId))).toEqual(new Set([player.userId]))
    expect((await app.fetch(`/api/ensembles/${ensembleId + 1000}/charts`, { cookie: director })).status).toBe(404)
  })

  it('refuses bad filters with a fixed message, a stable code and the field', async () => {
    for (const [q, field] of [['?from=2026-05-01&to=2026-04-01', 'to'], ['?tonic=C', 'tonic'], ['?tolerance=-1', 'tolerance'], ['?drillId=abc', 'drillId'], ['?colour=blue', '']] as const) {
      const r = await charts(q)
      expect(r.status, q).toBe(400)
      const body = await r.json()
      expect(typeof body.data?.code, q).toBe('string')
      if (field) expect(JSON.stringify(body.data), q).toContain(field)
      expect(JSON.stringify(body)).not.toMatch(/undefined|\[object Object\]|at .*\.ts/)
    }
  })
})

describe('GET /api/ensembles/:id/charts/choices', () => {
  it('offers a director every section and singer, a leader their section, a player themselves', async () => {
    const all = await (await app.fetch(`/api/ensembles/${ensembleId}/charts/choices`, { cookie: director })).json()
    expect(all.role).toBe('director')
    expect(all.sections.map((s: { id: number }) => s.id)).toEqual(sections.map(s => s.id))
    expect(all.players.length).toBe(singers().length)
    expect(all.assignments.map((a: { id: number }) => a.id).sort()).toEqual([assignments.all, assignments.section].sort())
    const leader = singers().find(m => m.role === 'section_leader' && m.sectionId === sections[0]!.id)!
    const mine = await (await app.fetch(`/api/ensembles/${ensembleId}/charts/choices`, { cookie: await app.login(leader.email) })).json()
    expect(mine.sections).toEqual([{ id: sections[0]!.id, name: sections[0]!.name }])
    expect(mine.players.every((p: { sectionId: number }) => p.sectionId === sections[0]!.id)).toBe(true)
    expect(mine.assignments.map((a: { id: number }) => a.id)).toEqual([assignments.all])
    const player = singers().find(m => m.role === 'player')!
    const own = await (await app.fetch(`/api/ensembles/${ensembleId}/charts/choices`, { cookie: await app.login(player.email) })).json()
    expect(own.players.map((p: { userId: number }) => p.userId)).toEqual([player.userId])
    expect(own.tolerance).toBe(10)
  })
})

describe('cached figures', () => {
  // Runs last: it withdraws a take. A cached answer must never outlive a change to the takes.
  it('drops a player’s withdrawn take from the charts and the statistics at the next request', async () => {
    const player = singers().find(m => m.role === 'player')!
    const cookie = await app.login(player.email)
    const before = await (await charts(`?userId=${player.userId}`)).json()
    const stats = async () => (await app.fetch(`/api/ensembles/${ensembleId}/stats?userId=${player.userId}`, { cookie: director })).json()
    const statsBefore = await stats()
    expect(await (await charts(`?userId=${player.userId}`)).json()).toEqual(before) // the same answer again
    const last = before.takes[before.takes.length - 1].takeId as number
    const w = await app.fetch(`/api/takes/${last}/withdraw`, { method: 'POST', cookie })
    expect(w.status).toBe(200)
    const after = await (await charts(`?userId=${player.userId}`)).json()
    expect(after.takes.map((t: { takeId: number }) => t.takeId)).toEqual(before.takes.map((t: { takeId: number }) => t.takeId).filter((id: number) => id !== last))
    expect((await stats()).takes).toBe(statsBefore.takes - 1)
  })
})
