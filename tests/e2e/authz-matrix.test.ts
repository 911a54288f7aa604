// The authorisation matrix: every route of server/api (and server/routes) called by every kind of
// caller, each with the status it must get. A route file without a row fails the test, so a new
// route cannot ship without its row. The objects belong to one ensemble ("X"); the callers are
// chosen from the demo accounts the README lists. HTTP semantics (RFC 9110 §15.5): 401 without a
// (live) session, 403 for a signed-in caller whose role in X does not allow it, 404 for anything
// of an ensemble the caller does not belong to (never 403, never 200: its existence is not told).
import { readdirSync, readFileSync } from 'node:fs'
import { join, relative, sep } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { ROOT, demoPassword, startApp, type App } from './harness'
import { triadTake } from './takes-helpers'

const CALLERS = ['anonymous', 'player', 'leaderSameSection', 'leaderOtherSection', 'director', 'directorElsewhere', 'siteAdmin', 'disabled'] as const
type Caller = typeof CALLERS[number]

// One row per route: the status for each caller, in the order of CALLERS.
//   player: a player of X who owns the take; leaderSameSection: the leader of that player's section;
//   leaderOtherSection: a leader of another section of X; director: a director of X;
//   directorElsewhere: a director of another ensemble, not a member of X; siteAdmin; disabled: a
//   player of X whose account was disabled while their session was live.
type Row = [route: string, anon: number, player: number, sameLeader: number, otherLeader: number, director: number, elsewhere: number, admin: number, disabled: number]
const MATRIX: Row[] = [
  //  route                                          anon player same other  dir  else admin disabled
  ['GET /api/health',                                200, 200, 200, 200, 200, 200, 200, 200],
  ['POST /api/auth/login',                           400, 400, 400, 400, 400, 400, 400, 400], // empty body: public, answers on input alone
  ['POST /api/auth/logout',                          401, 200, 200, 200, 200, 200, 200, 401],
  ['POST /api/auth/password-reset',                  202, 202, 202, 202, 202, 202, 202, 202],
  ['POST /api/auth/password-reset/confirm',          400, 400, 400, 400, 400, 400, 400, 400], // made-up token
  ['GET /api/dev/mail',                              401, 200, 200, 200, 200, 200, 200, 401],
  ['GET /api/dev/mail/[id]',                         401, 200, 404, 404, 404, 404, 200, 401], // a message to the player
  ['GET /api/home',                                  401, 200, 200, 200, 200, 200, 200, 401],
  ['GET /api/ensembles',                             401, 200, 200, 200, 200, 200, 200, 401],
  ['GET /api/ensembles/[id]/drills',                 401, 200, 200, 200, 200, 404, 200, 401],
  ['GET /api/ensembles/[id]/stats',                  401, 200, 200, 403, 200, 404, 200, 401], // the player's figures
  ['GET /api/ensembles/[id]/holds.csv',              401, 200, 200, 403, 200, 404, 200, 401], // the player's holds
  ['POST /api/ensembles/[id]/drills/import',         401, 403, 403, 403, 201, 404, 201, 401],
  ['GET /api/drills/[id]',                           401, 200, 200, 200, 200, 404, 200, 401],
  ['GET /api/takes',                                 401, 200, 200, 200, 200, 200, 200, 401],
  ['POST /api/takes',                                401, 202, 202, 202, 202, 404, 202, 401],
  ['GET /api/takes/[id]',                            401, 200, 200, 404, 200, 404, 200, 401],
  ['GET /api/takes/[id]/events',                     401, 200, 200, 404, 200, 404, 200, 401],
  ['GET /takes/[id]/audio',                          404, 200, 200, 404, 200, 404, 200, 404], // audio answers 404 to anyone who may not hear it
  ['POST /api/takes/[id]/rescore',                   401, 200, 200, 404, 200, 404, 200, 401],
  ['POST /api/takes/[id]/withdraw',                  401, 200, 403, 404, 403, 404, 403, 401], // only the player withdraws
  ['POST /api/takes/[id]/restore',                   401, 403, 404, 404, 200, 404, 200, 401], // withdrawn: hidden from the section leader
  ['POST /api/takes/[id]/reanalyse',                 401, 202, 403, 404, 202, 404, 202, 401],
  ['GET /api/account',                               401, 200, 200, 200, 200, 200, 200, 401],
  ['PATCH /api/account',                             401, 200, 200, 200, 200, 200, 200, 401],
  ['POST /api/account/password',                     401, 400, 400, 400, 400, 400, 400, 401], // wrong current password: nothing changes
  ['GET /api/admin/users',                           401, 403, 403, 403, 403, 403, 200, 401],
  ['PATCH /api/admin/users/[id]',                    401, 403, 403, 403, 403, 403, 200, 401],
  ['GET /api/admin/ensembles',                       401, 403, 403, 403, 403, 403, 200, 401],
  ['POST /api/admin/ensembles',                      401, 403, 403, 403, 403, 403, 201, 401],
  ['PATCH /api/admin/ensembles/[id]',                401, 403, 403, 403, 403, 403, 200, 401],
  ['GET /api/admin/audit',                           401, 403, 403, 403, 403, 403, 200, 401],
  ['GET /api/admin/audit/facets',                    401, 403, 403, 403, 403, 403, 200, 401],
  // ---- charts ----
  ['GET /api/ensembles/[id]/charts',                 401, 200, 200, 403, 200, 404, 200, 401], // the player's series
  ['GET /api/ensembles/[id]/charts/choices',         401, 200, 200, 200, 200, 404, 200, 401], // each member gets their own choices
]

// Routes that landed after the rows above were written and still need their row (and a CALLS
// entry): their own e2e files check their access rules today. Listed so the gap stays visible; a
// route in neither list fails the check below.
const PENDING: string[] = [
  'DELETE /api/ensembles/[id]/members/[userId]',
  'DELETE /api/ensembles/[id]/sections/[sectionId]',
  'GET /api/drills/[id]/export',
  'GET /api/ensembles/[id]',
  'GET /api/ensembles/[id]/drills/defaults',
  'GET /api/ensembles/[id]/invitations',
  'GET /api/ensembles/[id]/members',
  'GET /api/invitations/[token]',
  'HEAD /takes/[id]/audio',
  'PATCH /api/ensembles/[id]',
  'PATCH /api/ensembles/[id]/members/[userId]',
  'PATCH /api/ensembles/[id]/sections/[sectionId]',
  'POST /api/drills/[id]/archive',
  'POST /api/drills/[id]/duplicate',
  'POST /api/drills/[id]/restore',
  'POST /api/ensembles/[id]/drills',
  'POST /api/ensembles/[id]/invitations',
  'POST /api/ensembles/[id]/invitations/[invitationId]/resend',
  'POST /api/ensembles/[id]/invitations/[invitationId]/revoke',
  'POST /api/ensembles/[id]/invitations/bulk',
  'POST /api/ensembles/[id]/invitations/bulk-preview',
  'POST /api/ensembles/[id]/sections',
  'POST /api/ensembles/[id]/sections/[sectionId]/merge',
  'POST /api/ensembles/[id]/sections/order',
  'POST /api/invitations/[token]/accept',
  'PUT /api/drills/[id]',
]

// ---- the routes on disk ----------------------------------------------------------------------

const METHODS = ['get', 'head', 'post', 'put', 'patch', 'delete'] as const
function walk (dir: string): string[] {
  return readdirSync(dir, { withFileTypes: true }).flatMap(e => e.isDirectory() ? walk(join(dir, e.name)) : [join(dir, e.name)])
}
/** `server/api/takes/[id].get.ts` → "GET /api/takes/[id]" (the form the rows use). */
function routeOf (base: string, prefix: string, file: string): string {
  let rel = relative(base, file).split(sep).join('/').replace(/\.(ts|js|mjs)$/, '')
  let method = 'GET'
  const m = new RegExp(`\\.(${METHODS.join('|')})$`).exec(rel)
  if (m) {
    method = m[1]!.toUpperCase()
    rel = rel.slice(0, -m[0].length)
  }
  const path = rel.split('/').filter(s => s !== 'index').join('/')
  return `${method} ${`${prefix}/${path}`.replace(/\/$/, '')}`
}
const onDisk = (dir: string, prefix: string) => walk(join(ROOT, dir))
  .filter(f => /\.(ts|js|mjs)$/.test(f) && !f.endsWith('.d.ts'))
  .map(f => routeOf(join(ROOT, dir), prefix, f))
const ROUTES = [...onDisk('server/api', '/api'), ...onDisk('server/routes', '')]

// ---- the scenario ---------------------------------------------------------------------------

type Person = { email: string, role: string, ensemble: string, section: string }
function readmePeople (): Person[] {
  const text = readFileSync(join(ROOT, 'README.md'), 'utf8')
  return [...text.matchAll(/^\|\s*([^|\s]+@example\.org)\s*\|\s*([^|]+?)\s*\|\s*([^|]*?)\s*\|\s*([^|]*?)\s*\|/gm)]
    .map(m => ({ email: m[1]!, role: m[2]!, ensemble: m[3]!, section: m[4]! }))
}

let app: App
const cookies = {} as Record<Caller, string>
const emails = {} as Record<Caller, string>
const ids = { ensemble: 0, drill: 0, take: 0, mail: '', leaderOther: 0, player: 0 }
let drillDoc: unknown
let part = ''
const audio = triadTake([0, 0, 0]).wav

type Json = Record<string, any>
const asJson = async (r: Response) => await r.json() as Json

beforeAll(async () => {
  app = await startApp()
  const people = readmePeople()
  const admin = people.find(p => p.role === 'site admin')!
  cookies.siteAdmin = await app.login(admin.email)
  emails.siteAdmin = admin.email
  const ensembles = [...new Set(people.filter(p => p.role === 'director').map(p => p.ensemble))]
  const memberOf = (email: string, ensemble: string) => people.some(p => p.email === email && p.ensemble === ensemble)
  let chosen: Record<string, Person> | null = null
  for (const x of ensembles) {
    const director = people.find(p => p.ensemble === x && p.role === 'director')
    const elsewhere = people.find(p => p.role === 'director' && p.ensemble !== x && !memberOf(p.email, x))
    // Players of X who are players wherever they belong, so no other role blurs the row.
    const players = people.filter(p => p.ensemble === x && p.role === 'player' && people.every(o => o.email !== p.email || o.role === 'player'))
    for (const player of players) {
      const same = people.find(p => p.ensemble === x && p.role === 'section leader' && p.section === player.section)
      const other = people.find(p => p.ensemble === x && p.role === 'section leader' && p.section !== player.section)
      const disabled = players.find(p => p.email !== player.email)
      if (!director || !elsewhere || !same || !other || !disabled) continue
      const c = await app.login(player.email)
      const takes = await asJson(await app.fetch('/api/takes?player=me', { cookie: c }))
      if (!takes.items?.length) continue
      ids.take = takes.items[0].id
      ids.drill = takes.items[0].drillId
      chosen = { director, elsewhere, player, same, other, disabled }
      break
    }
    if (chosen) break
  }
  if (!chosen) throw new Error('The README\'s demo accounts have no ensemble with every kind of caller')
  const pick: Record<Exclude<Caller, 'anonymous' | 'siteAdmin'>, Person> = {
    player: chosen.player!, leaderSameSection: chosen.same!, leaderOtherSection: chosen.other!,
    director: chosen.director!, directorElsewhere: chosen.elsewhere!, disabled: chosen.disabled!,
  }
  for (const [caller, p] of Object.entries(pick) as [Caller, Person][]) {
    emails[caller] = p.email
    cookies[caller] = await app.login(p.email)
  }
  cookies.anonymous = ''
  part = chosen.player!.section

  const mine = await asJson(await app.fetch('/api/ensembles', { cookie: cookies.director }))
  ids.ensemble = (mine as unknown as Json[]).find(e => e.name === chosen!.player!.ensemble)!.id
  drillDoc = (await asJson(await app.fetch(`/api/drills/${ids.drill}`, { cookie: cookies.director }))).document
  const users = await asJson(await app.fetch(`/api/admin/users?q=${encodeURIComponent(emails.leaderOtherSection)}`, { cookie: cookies.siteAdmin }))
  ids.leaderOther = users.items[0].id
  ids.player = (await asJson(await app.fetch(`/api/admin/users?q=${encodeURIComponent(emails.player)}`, { cookie: cookies.siteAdmin }))).items[0].id

  // A message to the player (a reset link they did not use): theirs and the admin's to read.
  await app.fetch('/api/auth/password-reset', { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ email: emails.player }) })
  for (let i = 0; i < 50 && !ids.mail; i++) {
    const list = await asJson(await app.fetch('/api/dev/mail', { cookie: cookies.player })) as unknown as Json[]
    ids.mail = list[0]?.id ?? ''
    if (!ids.mail) await new Promise(r => setTimeout(r, 100))
  }

  // The disabled caller had a live session when the admin disabled the account.
  expect((await app.fetch('/api/home', { cookie: cookies.disabled })).status).toBe(200)
  const disabledId = (await asJson(await app.fetch(`/api/admin/users?q=${encodeURIComponent(emails.disabled)}`, { cookie: cookies.siteAdmin }))).items[0].id
  const off = await app.fetch(`/api/admin/users/${disabledId}`, { method: 'PATCH', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ disabled: true }), cookie: cookies.siteAdmin })
  expect(off.status).toBe(200)
})
afterAll(async () => { await app?.stop() })

// ---- how each route is called --------------------------------------------------------------

interface Call {
  path: () => string
  body?: (caller: Caller) => unknown
  /** Brings the object into the state the row is about before each caller. */
  before?: () => Promise<void>
  /** Calls with a session of its own (the route ends the session it is called with). */
  fresh?: boolean
}

const form = (entries: Record<string, string | Blob>, files: Record<string, [Blob, string]> = {}) => {
  const f = new FormData()
  for (const [k, v] of Object.entries(entries)) f.append(k, v as string)
  for (const [k, [blob, name]] of Object.entries(files)) f.append(k, blob, name)
  return f
}
const asDirector = (method: string, path: string) => app.fetch(path, { method, cookie: cookies.director })
async function takeStatus (): Promise<Json> {
  return asJson(await app.fetch(`/api/takes/${ids.take}`, { cookie: cookies.director }))
}
async function analysed (): Promise<void> {
  for (let i = 0; i < 600; i++) {
    const t = await takeStatus()
    if (t.status === 'analysed' || t.status === 'failed') return
    await new Promise(r => setTimeout(r, 200))
  }
  throw new Error('the take was not analysed again in time')
}
async function notWithdrawn (): Promise<void> {
  if ((await takeStatus()).withdrawnAt) await asDirector('POST', `/api/takes/${ids.take}/restore`)
}
async function withdrawn (): Promise<void> {
  if (!(await takeStatus()).withdrawnAt) await app.fetch(`/api/takes/${ids.take}/withdraw`, { method: 'POST', cookie: cookies.player })
}
/** Each row of a take starts from a take that is analysed and not withdrawn, unless it says otherwise. */
const ready = async () => { await notWithdrawn(); await analysed() }
let uniq = 0

const CALLS: Record<string, Call> = {
  'GET /api/health': { path: () => '/api/health' },
  'POST /api/auth/login': { path: () => '/api/auth/login', body: () => ({}) },
  'POST /api/auth/logout': { path: () => '/api/auth/logout', fresh: true },
  'POST /api/auth/password-reset': { path: () => '/api/auth/password-reset', body: () => ({ email: 'nobody.here@example.org' }) },
  'POST /api/auth/password-reset/confirm': { path: () => '/api/auth/password-reset/confirm', body: () => ({ token: 'made-up-token', password: 'long-enough-1' }) },
  'GET /api/dev/mail': { path: () => '/api/dev/mail' },
  'GET /api/dev/mail/[id]': { path: () => `/api/dev/mail/${ids.mail}` },
  'GET /api/home': { path: () => '/api/home' },
  'GET /api/ensembles': { path: () => '/api/ensembles' },
  'GET /api/ensembles/[id]/drills': { path: () => `/api/ensembles/${ids.ensemble}/drills` },
  'GET /api/ensembles/[id]/stats': { path: () => `/api/ensembles/${ids.ensemble}/stats?userId=${ids.player}` },
  'GET /api/ensembles/[id]/holds.csv': { path: () => `/api/ensembles/${ids.ensemble}/holds.csv?userId=${ids.player}` },
  'POST /api/ensembles/[id]/drills/import': {
    path: () => `/api/ensembles/${ids.ensemble}/drills/import`,
    body: () => form({}, { file: [new Blob([JSON.stringify(drillDoc)], { type: 'application/json' }), 'drill.json'] }),
  },
  'GET /api/drills/[id]': { path: () => `/api/drills/${ids.drill}` },
  'GET /api/takes': { path: () => '/api/takes' },
  'POST /api/takes': {
    path: () => '/api/takes',
    body: () => form({ drillId: String(ids.drill), part }, { audio: [new Blob([new Uint8Array(audio)], { type: 'audio/wav' }), 'take.wav'] }),
  },
  'GET /api/takes/[id]': { path: () => `/api/takes/${ids.take}`, before: ready },
  'GET /api/takes/[id]/events': { path: () => `/api/takes/${ids.take}/events`, before: ready },
  'GET /takes/[id]/audio': { path: () => `/takes/${ids.take}/audio`, before: ready },
  'POST /api/takes/[id]/rescore': { path: () => `/api/takes/${ids.take}/rescore`, body: () => ({ system: { name: 'just-root' } }), before: ready },
  'POST /api/takes/[id]/withdraw': { path: () => `/api/takes/${ids.take}/withdraw`, before: ready },
  'POST /api/takes/[id]/restore': { path: () => `/api/takes/${ids.take}/restore`, before: withdrawn },
  'POST /api/takes/[id]/reanalyse': { path: () => `/api/takes/${ids.take}/reanalyse`, before: ready },
  'GET /api/account': { path: () => '/api/account' },
  'PATCH /api/account': { path: () => '/api/account', body: () => ({ pitchView: 'concert' }) },
  'POST /api/account/password': { path: () => '/api/account/password', body: () => ({ currentPassword: 'not-the-password', newPassword: 'never-set-this-1' }) },
  'GET /api/admin/users': { path: () => '/api/admin/users' },
  'PATCH /api/admin/users/[id]': { path: () => `/api/admin/users/${ids.leaderOther}`, body: () => ({ siteAdmin: false }) },
  'GET /api/admin/ensembles': { path: () => '/api/admin/ensembles' },
  'POST /api/admin/ensembles': { path: () => '/api/admin/ensembles', body: c => ({ name: `Matrix Ensemble ${c} ${++uniq}`, kind: 'choir', directorEmail: `matrix.${uniq}@example.org` }) },
  'PATCH /api/admin/ensembles/[id]': { path: () => `/api/admin/ensembles/${ids.ensemble}`, body: () => ({ archived: false }) },
  'GET /api/admin/audit': { path: () => '/api/admin/audit' },
  'GET /api/admin/audit/facets': { path: () => '/api/admin/audit/facets' },
  // ---- charts ----
  'GET /api/ensembles/[id]/charts': { path: () => `/api/ensembles/${ids.ensemble}/charts?userId=${ids.player}` },
  'GET /api/ensembles/[id]/charts/choices': { path: () => `/api/ensembles/${ids.ensemble}/charts/choices` },
}

async function callAs (caller: Caller, route: string, call: Call): Promise<number> {
  const method = route.split(' ')[0]!
  let cookie = cookies[caller]
  if (call.fresh && caller !== 'anonymous' && caller !== 'disabled') cookie = await app.login(emails[caller], demoPassword())
  const body = call.body?.(caller)
  const init: RequestInit & { cookie?: string } = { method, cookie }
  if (body instanceof FormData) init.body = body
  else if (body !== undefined) {
    init.headers = { 'content-type': 'application/json' }
    init.body = JSON.stringify(body)
  }
  const ctrl = new AbortController()
  init.signal = ctrl.signal
  const res = await app.fetch(call.path(), init)
  // Event streams stay open: the status is all this test needs.
  if ((res.headers.get('content-type') ?? '').includes('text/event-stream')) ctrl.abort()
  else await res.arrayBuffer()
  return res.status
}

describe('authorisation matrix', () => {
  it('has a row for every route on disk, and no row for a route that is gone', () => {
    const rows = MATRIX.map(r => r[0])
    expect(ROUTES.filter(r => !rows.includes(r) && !PENDING.includes(r)), 'routes without a row in MATRIX').toEqual([])
    expect(PENDING.filter(r => !ROUTES.includes(r) || rows.includes(r)), 'PENDING lists only routes on disk without a row').toEqual([])
    expect(rows.filter(r => !ROUTES.includes(r)), 'rows for routes that do not exist').toEqual([])
    expect(Object.keys(CALLS).sort(), 'every row says how to call its route').toEqual([...rows].sort())
    expect(new Set(rows).size).toBe(rows.length)
  })

  it.each(MATRIX.map(r => [r[0], r] as const))('%s', async (route, row) => {
    const call = CALLS[route]
    if (!call) throw new Error(`no entry in CALLS for ${route}`)
    const expected = Object.fromEntries(CALLERS.map((c, i) => [c, row[i + 1]]))
    const got: Record<string, number> = {}
    for (const caller of CALLERS) {
      await call.before?.()
      got[caller] = await callAs(caller, route, call)
    }
    expect(got).toEqual(expected)
  })
})
