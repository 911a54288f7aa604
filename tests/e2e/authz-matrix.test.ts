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
import { latestMailTo, linksIn } from './people-helpers'
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
  ['GET /api/ensembles/[id]',                        401, 200, 200, 200, 200, 404, 200, 401],
  ['PATCH /api/ensembles/[id]',                      401, 403, 403, 403, 200, 404, 200, 401], // the current reference pitch again
  ['GET /api/ensembles/[id]/members',                401, 200, 200, 200, 200, 404, 200, 401],
  ['PATCH /api/ensembles/[id]/members/[userId]',     401, 403, 403, 403, 200, 404, 200, 401], // the player's own section again
  ['DELETE /api/ensembles/[id]/members/[userId]',    401, 403, 403, 403, 204, 404, 204, 401], // a member who joined for this call
  ['POST /api/ensembles/[id]/sections',              401, 403, 403, 403, 201, 404, 201, 401],
  ['PATCH /api/ensembles/[id]/sections/[sectionId]', 401, 403, 403, 403, 200, 404, 200, 401], // a section made for this call
  ['DELETE /api/ensembles/[id]/sections/[sectionId]', 401, 403, 403, 403, 204, 404, 204, 401], // an empty section made for this call
  ['POST /api/ensembles/[id]/sections/[sectionId]/merge', 401, 403, 403, 403, 200, 404, 200, 401], // two sections made for this call
  ['POST /api/ensembles/[id]/sections/order',        401, 403, 403, 403, 200, 404, 200, 401], // the current order again
  ['GET /api/ensembles/[id]/invitations',            401, 403, 403, 403, 200, 404, 200, 401],
  ['POST /api/ensembles/[id]/invitations',           401, 403, 403, 403, 201, 404, 201, 401],
  ['POST /api/ensembles/[id]/invitations/[invitationId]/resend', 401, 403, 403, 403, 200, 404, 200, 401], // an open invitation made for this call
  ['POST /api/ensembles/[id]/invitations/[invitationId]/revoke', 401, 403, 403, 403, 200, 404, 200, 401], // an open invitation made for this call
  ['POST /api/ensembles/[id]/invitations/bulk-preview', 401, 403, 403, 403, 200, 404, 200, 401],
  ['POST /api/ensembles/[id]/invitations/bulk',      401, 403, 403, 403, 201, 404, 201, 401],
  // The link is the credential: anyone holding it reads the invitation, a session or none.
  ['GET /api/invitations/[token]',                   200, 200, 200, 200, 200, 200, 200, 200],
  // A fresh link to an address without an account: signed out (or with a dead session) it creates
  // the account; signed in as someone else it is refused (403 wrong_account) and stays usable.
  ['POST /api/invitations/[token]/accept',           200, 403, 403, 403, 403, 403, 403, 200],
  ['GET /api/ensembles/[id]/drills/defaults',        401, 403, 403, 403, 200, 404, 200, 401],
  ['POST /api/ensembles/[id]/drills',                401, 403, 403, 403, 201, 404, 201, 401],
  ['GET /api/ensembles/[id]/drills',                 401, 200, 200, 200, 200, 404, 200, 401],
  ['GET /api/ensembles/[id]/stats',                  401, 200, 200, 403, 200, 404, 200, 401], // the player's figures
  ['GET /api/ensembles/[id]/holds.csv',              401, 200, 200, 403, 200, 404, 200, 401], // the player's holds
  ['POST /api/ensembles/[id]/drills/import',         401, 403, 403, 403, 201, 404, 201, 401],
  ['GET /api/drills/[id]',                           401, 200, 200, 200, 200, 404, 200, 401],
  ['GET /api/drills/[id]/export',                    401, 200, 200, 200, 200, 404, 200, 401],
  ['PUT /api/drills/[id]',                           401, 403, 403, 403, 200, 404, 200, 401], // a spare drill, its current version
  ['POST /api/drills/[id]/archive',                  401, 403, 403, 403, 200, 404, 200, 401], // a spare drill, restored first
  ['POST /api/drills/[id]/restore',                  401, 403, 403, 403, 200, 404, 200, 401], // a spare drill, archived first
  ['POST /api/drills/[id]/duplicate',                401, 403, 403, 403, 201, 404, 201, 401],
  ['GET /api/takes',                                 401, 200, 200, 200, 200, 200, 200, 401],
  ['POST /api/takes',                                401, 202, 202, 202, 202, 404, 202, 401],
  ['GET /api/takes/[id]',                            401, 200, 200, 404, 200, 404, 200, 401],
  ['GET /api/takes/[id]/events',                     401, 200, 200, 404, 200, 404, 200, 401],
  ['GET /takes/[id]/audio',                          404, 200, 200, 404, 200, 404, 200, 404], // audio answers 404 to anyone who may not hear it
  ['HEAD /takes/[id]/audio',                         404, 200, 200, 404, 200, 404, 200, 404],
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
  // ---- assignments ----
  ['GET /api/assignments',                           401, 200, 200, 200, 200, 200, 200, 401], // the caller's own
  ['GET /api/ensembles/[id]/assignments',            401, 403, 200, 200, 200, 404, 200, 401],
  ['POST /api/ensembles/[id]/assignments',           401, 403, 403, 403, 201, 404, 201, 401],
  ['PATCH /api/ensembles/[id]/assignments/[assignmentId]', 401, 403, 403, 403, 200, 404, 200, 401],
  ['GET /api/ensembles/[id]/assignments/[assignmentId]/progress', 401, 403, 200, 200, 200, 404, 200, 401], // another section's leader: an empty list
  // ---- review ----
  ['POST /api/takes/[id]/reviews',                   401, 403, 201, 403, 201, 404, 201, 401], // the player's take: never by the player; a new review each
  ['GET /api/reviews/queue',                         401, 403, 200, 403, 200, 404, 200, 401], // the player's section
  // ---- charts ----
  ['GET /api/ensembles/[id]/charts',                 401, 200, 200, 403, 200, 404, 200, 401], // the player's series
  ['GET /api/ensembles/[id]/charts/choices',         401, 200, 200, 200, 200, 404, 200, 401], // each member gets their own choices
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
const ids = { ensemble: 0, drill: 0, take: 0, mail: '', leaderOther: 0, player: 0, playerSection: 0, a4: 440, spareDrill: 0, spareVersion: 0, token: '', freshToken: '', invitation: 0, member: 0, section: 0, otherSection: 0, sectionOrder: [] as number[] }
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

  const detail = await asJson(await app.fetch(`/api/ensembles/${ids.ensemble}`, { cookie: cookies.director }))
  ids.a4 = detail.a4
  ids.playerSection = (detail.sections as Json[]).find(sec => sec.name === part)!.id
  // A drill of X of its own for the rows that archive, restore and edit (the take's drill stays as it is).
  const spare = await app.fetch(`/api/ensembles/${ids.ensemble}/drills`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify(drillDoc), cookie: cookies.director })
  expect(spare.status).toBe(201)
  ids.spareDrill = (await asJson(spare)).id
  // An open invitation whose link the public read route is called with.
  ids.token = (await newInvitation()).token

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

/** A new open invitation of X to an address without an account, and the token its message carries. */
async function newInvitation (): Promise<{ id: number, token: string, email: string }> {
  const email = `matrix.invitee.${++uniq}@example.org`
  const r = await app.fetch(`/api/ensembles/${ids.ensemble}/invitations`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ email, role: 'player', sectionId: null }), cookie: cookies.director })
  if (r.status !== 201) throw new Error(`the invitation for the matrix was refused (${r.status})`)
  const { id } = await asJson(r)
  const link = linksIn((await latestMailTo(app, cookies.siteAdmin, email)).text).find(l => l.includes('/invitations/'))!
  return { id, email, token: decodeURIComponent(link.split('/invitations/')[1]!) }
}
async function freshInvitation (): Promise<void> {
  const inv = await newInvitation()
  ids.invitation = inv.id
  ids.freshToken = inv.token
}
/** A new member of X (an accepted invitation) for the call that removes one. */
async function freshMember (): Promise<void> {
  const { token } = await newInvitation()
  const r = await app.fetch(`/api/invitations/${encodeURIComponent(token)}/accept`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ name: 'Matrix Member', password: 'long-enough-pass-1' }) })
  if (r.status !== 200) throw new Error(`the matrix member could not join (${r.status})`)
  ids.member = (await asJson(r)).user.id
}
async function newSection (): Promise<number> {
  const r = await app.fetch(`/api/ensembles/${ids.ensemble}/sections`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ name: `Matrix section ${++uniq}` }), cookie: cookies.director })
  if (r.status !== 201) throw new Error(`the matrix section was refused (${r.status})`)
  return (await asJson(r)).id
}
async function spareVersion (): Promise<void> {
  ids.spareVersion = (await asJson(await app.fetch(`/api/drills/${ids.spareDrill}`, { cookie: cookies.director }))).version
}

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
  'GET /api/ensembles/[id]': { path: () => `/api/ensembles/${ids.ensemble}` },
  'PATCH /api/ensembles/[id]': { path: () => `/api/ensembles/${ids.ensemble}`, body: () => ({ a4: ids.a4 }) },
  'GET /api/ensembles/[id]/members': { path: () => `/api/ensembles/${ids.ensemble}/members` },
  'PATCH /api/ensembles/[id]/members/[userId]': { path: () => `/api/ensembles/${ids.ensemble}/members/${ids.player}`, body: () => ({ sectionId: ids.playerSection }) },
  'DELETE /api/ensembles/[id]/members/[userId]': { path: () => `/api/ensembles/${ids.ensemble}/members/${ids.member}`, before: freshMember },
  'POST /api/ensembles/[id]/sections': { path: () => `/api/ensembles/${ids.ensemble}/sections`, body: () => ({ name: `Matrix new section ${++uniq}` }) },
  'PATCH /api/ensembles/[id]/sections/[sectionId]': {
    path: () => `/api/ensembles/${ids.ensemble}/sections/${ids.section}`,
    body: () => ({ name: `Matrix renamed ${++uniq}` }),
    before: async () => { ids.section = await newSection() },
  },
  'DELETE /api/ensembles/[id]/sections/[sectionId]': { path: () => `/api/ensembles/${ids.ensemble}/sections/${ids.section}`, before: async () => { ids.section = await newSection() } },
  'POST /api/ensembles/[id]/sections/[sectionId]/merge': {
    path: () => `/api/ensembles/${ids.ensemble}/sections/${ids.section}/merge`,
    body: () => ({ intoId: ids.otherSection }),
    before: async () => { ids.section = await newSection(); ids.otherSection = await newSection() },
  },
  'POST /api/ensembles/[id]/sections/order': {
    path: () => `/api/ensembles/${ids.ensemble}/sections/order`,
    body: () => ({ ids: ids.sectionOrder }),
    before: async () => { ids.sectionOrder = ((await asJson(await app.fetch(`/api/ensembles/${ids.ensemble}`, { cookie: cookies.director }))).sections as Json[]).map(sec => sec.id) },
  },
  'GET /api/ensembles/[id]/invitations': { path: () => `/api/ensembles/${ids.ensemble}/invitations` },
  'POST /api/ensembles/[id]/invitations': { path: () => `/api/ensembles/${ids.ensemble}/invitations`, body: () => ({ email: `matrix.direct.${++uniq}@example.org`, role: 'player', sectionId: null }) },
  'POST /api/ensembles/[id]/invitations/[invitationId]/resend': { path: () => `/api/ensembles/${ids.ensemble}/invitations/${ids.invitation}/resend`, before: freshInvitation },
  'POST /api/ensembles/[id]/invitations/[invitationId]/revoke': { path: () => `/api/ensembles/${ids.ensemble}/invitations/${ids.invitation}/revoke`, before: freshInvitation },
  'POST /api/ensembles/[id]/invitations/bulk-preview': { path: () => `/api/ensembles/${ids.ensemble}/invitations/bulk-preview`, body: () => ({ csv: `name,email,section,role\nPreview Person,matrix.preview.${++uniq}@example.org,,player\n` }) },
  'POST /api/ensembles/[id]/invitations/bulk': { path: () => `/api/ensembles/${ids.ensemble}/invitations/bulk`, body: () => ({ csv: `name,email,section,role\nBulk Person,matrix.bulk.${++uniq}@example.org,,player\n` }) },
  'GET /api/invitations/[token]': { path: () => `/api/invitations/${encodeURIComponent(ids.token)}` },
  'POST /api/invitations/[token]/accept': {
    path: () => `/api/invitations/${encodeURIComponent(ids.freshToken)}/accept`,
    body: () => ({ name: 'Matrix Newcomer', password: 'long-enough-pass-1' }),
    before: freshInvitation,
  },
  'GET /api/ensembles/[id]/drills/defaults': { path: () => `/api/ensembles/${ids.ensemble}/drills/defaults` },
  'POST /api/ensembles/[id]/drills': { path: () => `/api/ensembles/${ids.ensemble}/drills`, body: () => drillDoc },
  'GET /api/ensembles/[id]/drills': { path: () => `/api/ensembles/${ids.ensemble}/drills` },
  'GET /api/ensembles/[id]/stats': { path: () => `/api/ensembles/${ids.ensemble}/stats?userId=${ids.player}` },
  'GET /api/ensembles/[id]/holds.csv': { path: () => `/api/ensembles/${ids.ensemble}/holds.csv?userId=${ids.player}` },
  'POST /api/ensembles/[id]/drills/import': {
    path: () => `/api/ensembles/${ids.ensemble}/drills/import`,
    body: () => form({}, { file: [new Blob([JSON.stringify(drillDoc)], { type: 'application/json' }), 'drill.json'] }),
  },
  'GET /api/drills/[id]': { path: () => `/api/drills/${ids.drill}` },
  'GET /api/drills/[id]/export': { path: () => `/api/drills/${ids.drill}/export?format=json` },
  'PUT /api/drills/[id]': { path: () => `/api/drills/${ids.spareDrill}`, body: () => ({ document: drillDoc, version: ids.spareVersion }), before: spareVersion },
  'POST /api/drills/[id]/archive': { path: () => `/api/drills/${ids.spareDrill}/archive`, before: async () => { await asDirector('POST', `/api/drills/${ids.spareDrill}/restore`) } },
  'POST /api/drills/[id]/restore': { path: () => `/api/drills/${ids.spareDrill}/restore`, before: async () => { await asDirector('POST', `/api/drills/${ids.spareDrill}/archive`) } },
  'POST /api/drills/[id]/duplicate': { path: () => `/api/drills/${ids.spareDrill}/duplicate` },
  'GET /api/takes': { path: () => '/api/takes' },
  'POST /api/takes': {
    path: () => '/api/takes',
    body: () => form({ drillId: String(ids.drill), part }, { audio: [new Blob([new Uint8Array(audio)], { type: 'audio/wav' }), 'take.wav'] }),
  },
  'GET /api/takes/[id]': { path: () => `/api/takes/${ids.take}`, before: ready },
  'GET /api/takes/[id]/events': { path: () => `/api/takes/${ids.take}/events`, before: ready },
  'GET /takes/[id]/audio': { path: () => `/takes/${ids.take}/audio`, before: ready },
  'HEAD /takes/[id]/audio': { path: () => `/takes/${ids.take}/audio`, before: ready },
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
  // ---- assignments ----
  'GET /api/assignments': { path: () => '/api/assignments' },
  'GET /api/ensembles/[id]/assignments': { path: () => `/api/ensembles/${ids.ensemble}/assignments` },
  'POST /api/ensembles/[id]/assignments': {
    path: () => `/api/ensembles/${ids.ensemble}/assignments`,
    body: () => ({ drillId: ids.drill, sectionIds: [assignment.section], userIds: [], dueAt: new Date(Date.now() + 7 * 86400_000).toISOString(), instructions: 'Matrix' }),
    before: assignmentReady,
  },
  'PATCH /api/ensembles/[id]/assignments/[assignmentId]': {
    path: () => `/api/ensembles/${ids.ensemble}/assignments/${assignment.id}`,
    body: () => ({ instructions: 'Matrix edit' }),
    before: assignmentReady,
  },
  'GET /api/ensembles/[id]/assignments/[assignmentId]/progress': { path: () => `/api/ensembles/${ids.ensemble}/assignments/${assignment.id}/progress`, before: assignmentReady },
  // ---- review ----
  'POST /api/takes/[id]/reviews': { path: () => `/api/takes/${ids.take}/reviews`, body: () => ({ verdict: 'approved', notes: [{ body: 'Matrix note' }] }), before: ready },
  'GET /api/reviews/queue': { path: () => `/api/reviews/queue?sectionId=${ids.playerSection}` },
  // ---- charts ----
  'GET /api/ensembles/[id]/charts': { path: () => `/api/ensembles/${ids.ensemble}/charts?userId=${ids.player}` },
  'GET /api/ensembles/[id]/charts/choices': { path: () => `/api/ensembles/${ids.ensemble}/charts/choices` },
}

// An assignment of X to the player's section, made once by its director.
const assignment = { section: 0, id: 0 }
async function assignmentReady (): Promise<void> {
  if (assignment.id) return
  const ensemble = await asJson(await asDirector('GET', `/api/ensembles/${ids.ensemble}`))
  assignment.section = ensemble.sections.find((s: Json) => s.name === part).id
  const r = await app.fetch(`/api/ensembles/${ids.ensemble}/assignments`, {
    method: 'POST', cookie: cookies.director, headers: { 'content-type': 'application/json' },
    body: JSON.stringify({ drillId: ids.drill, sectionIds: [assignment.section], dueAt: new Date(Date.now() + 7 * 86400_000).toISOString() }),
  })
  assignment.id = (await asJson(r)).id
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
    expect(ROUTES.filter(r => !rows.includes(r)), 'routes without a row in MATRIX').toEqual([])
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
