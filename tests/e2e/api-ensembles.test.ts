// /api/ensembles and /api/home per role, checked against the demo accounts the README lists.
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { demoAccounts, startApp, type App } from './harness'

type Row = { email: string, role: string, ensemble: string, section: string }
const API_ROLE: Record<string, string> = { 'director': 'director', 'section leader': 'section_leader', 'player': 'player' }

let app: App
let rows: Row[]

beforeAll(async () => {
  app = await startApp()
  // The README table has a fourth column (section) that demoAccounts() leaves out.
  const { readFileSync } = await import('node:fs')
  const { join } = await import('node:path')
  const { ROOT } = await import('./harness')
  const text = readFileSync(join(ROOT, 'README.md'), 'utf8')
  const sections = new Map([...text.matchAll(/^\|\s*(\S+@example\.org)\s*\|\s*([^|]+?)\s*\|\s*([^|]+?)\s*\|\s*([^|]*?)\s*\|/gm)].map(m => [`${m[1]}|${m[3]}`, m[4]!]))
  rows = demoAccounts().map(a => ({ ...a, section: sections.get(`${a.email}|${a.ensemble}`) ?? '' }))
})
afterAll(async () => { await app?.stop() })

const members = () => rows.filter(r => API_ROLE[r.role])
/** A member who is a player in every ensemble they belong to. */
const onlyPlayer = () => members().find(r => r.role === 'player' && members().every(o => o.email !== r.email || o.role === 'player'))!
const ensembleNames = () => [...new Set(members().map(r => r.ensemble))]

describe('GET /api/ensembles', () => {
  it('lists each demo member\'s ensembles with their role in each', async () => {
    const emails = [...new Set(members().map(r => r.email))]
    for (const email of emails) {
      const cookie = await app.login(email)
      const list = await (await app.fetch('/api/ensembles', { cookie })).json() as { name: string, role: string }[]
      const expected = members().filter(r => r.email === email).map(r => ({ name: r.ensemble, role: API_ROLE[r.role] }))
      expect(list.map(e => ({ name: e.name, role: e.role })).sort((a, b) => a.name.localeCompare(b.name)))
        .toEqual(expected.sort((a, b) => a.name.localeCompare(b.name)))
    }
  })

  it('gives a user with different roles in two ensembles each role', async () => {
    const byEmail = new Map<string, Set<string>>()
    for (const r of members()) byEmail.set(r.email, (byEmail.get(r.email) ?? new Set()).add(r.role))
    const email = [...byEmail].find(([, roles]) => roles.size > 1)?.[0]
    expect(email, 'the README lists someone with two different roles').toBeDefined()
    const cookie = await app.login(email!)
    const list = await (await app.fetch('/api/ensembles', { cookie })).json() as { role: string }[]
    expect(new Set(list.map(e => e.role)).size).toBe(2)
  })

  it('shows the site admin every ensemble, with counts and the documented fields', async () => {
    const admin = rows.find(r => r.role === 'site admin')!
    const cookie = await app.login(admin.email)
    const list = await (await app.fetch('/api/ensembles', { cookie })).json() as { id: number, name: string, kind: string, role: string, sectionCount: number, memberCount: number, archived: boolean }[]
    expect(list.map(e => e.name).sort()).toEqual(ensembleNames().sort())
    for (const e of list) {
      expect(Object.keys(e).sort()).toEqual(['archived', 'id', 'kind', 'memberCount', 'name', 'role', 'sectionCount'])
      expect(['choir', 'brass_band', 'wind_band', 'mixed']).toContain(e.kind)
      expect(e.archived).toBe(false)
      const ms = members().filter(r => r.ensemble === e.name)
      expect(e.memberCount).toBe(ms.length)
      expect(e.sectionCount).toBe(new Set(ms.map(r => r.section).filter(Boolean)).size)
    }
  })

  it('answers 401 without a session', async () => {
    expect((await app.fetch('/api/ensembles')).status).toBe(401)
  })
})

describe('GET /api/home', () => {
  it('shows a player what is due, for the part named like their section', async () => {
    const player = onlyPlayer()
    const home = await (await app.fetch('/api/home', { cookie: await app.login(player.email) })).json()
    expect(home.user.email).toBe(player.email)
    expect(home.memberships).toContainEqual(expect.objectContaining({ ensembleName: player.ensemble, role: 'player', sectionName: player.section }))
    const due = home.due.filter((d: { ensembleName: string }) => d.ensembleName === player.ensemble)
    expect(due.length).toBeGreaterThan(0)
    for (const d of due) {
      expect(d.part).toBe(player.section)
      expect(typeof d.submitted).toBe('boolean')
      expect(Number.isNaN(Date.parse(d.dueAt))).toBe(false)
    }
    expect(home.toReview).toEqual([])
    expect(home.ensembleSummary).toEqual([])
  })

  it('shows a section leader takes of their own section only, never their own', async () => {
    for (const leader of members().filter(r => r.role === 'section leader')) {
      const home = await (await app.fetch('/api/home', { cookie: await app.login(leader.email) })).json()
      for (const t of home.toReview.filter((x: { ensembleName: string }) => x.ensembleName === leader.ensemble)) {
        expect(t.sectionName).toBe(leader.section)
        expect(t.playerName).not.toBe(home.user.name)
      }
    }
  })

  it('shows a director every section\'s takes to review and a summary per ensemble', async () => {
    const director = members().find(r => r.role === 'director')!
    const home = await (await app.fetch('/api/home', { cookie: await app.login(director.email) })).json()
    const mine = home.toReview.filter((t: { ensembleName: string }) => t.ensembleName === director.ensemble)
    expect(mine.length).toBeGreaterThan(0)
    expect(new Set(mine.map((t: { sectionName: string }) => t.sectionName)).size).toBeGreaterThan(1)
    for (const t of mine) expect(['queued', 'analysing', 'analysed', 'failed']).toContain(t.status)
    expect(home.ensembleSummary).toContainEqual(expect.objectContaining({ ensembleName: director.ensemble }))
  })

  it('lists the caller\'s own takes as recent', async () => {
    const player = onlyPlayer()
    const home = await (await app.fetch('/api/home', { cookie: await app.login(player.email) })).json()
    // Every submitted assignment is one of the caller's takes.
    if (home.due.some((d: { submitted: boolean }) => d.submitted)) expect(home.recent.length).toBeGreaterThan(0)
    for (const t of home.recent) {
      // `tolerance`: the ± cents the take was scored at, so its badge is graded like its report;
      // `driftCentsPerMin`: null until analysed, or when too few holds give a slope;
      // `review`: the latest verdict and who gave it, null until reviewed.
      expect(Object.keys(t).sort()).toEqual(['createdAt', 'driftCentsPerMin', 'drillTitle', 'meanAbsCents', 'part', 'review', 'status', 'takeId', 'tolerance', 'withinToleranceShare'])
      expect(t.tolerance).toBeGreaterThan(0)
    }
  })
})
