// Ensemble settings, sections, members and invitations through the HTTP API of the built app.
// Status codes follow RFC 9110 §15 (201 Created, 204 No Content, 403, 404, 409 Conflict, 410 Gone).
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { demoAccounts, startApp, type App } from './harness'
import { ensembleId, errorOf, json, latestMailTo, linksIn, mailCount, withDb } from './people-helpers'

let app: App
const accounts = demoAccounts()
const admin = accounts.find(a => a.role === 'site admin')!.email
const choir = accounts.find(a => a.role === 'director' && /Choir/.test(a.ensemble))!
const brassDirector = { email: 'outside.director@example.org' } // made in beforeAll: directs another ensemble only
const choirPlayers = accounts.filter(a => a.role === 'player' && a.ensemble === choir.ensemble)
const onlyPlayer = choirPlayers.find(p => accounts.every(o => o.email !== p.email || o.role === 'player'))!
const leader = accounts.find(a => a.role === 'section leader' && a.ensemble === choir.ensemble)!
const cookies: Record<string, string> = {}
let id: number

beforeAll(async () => {
  app = await startApp()
  for (const e of [admin, choir.email, onlyPlayer.email, leader.email]) cookies[e] = await app.login(e)
  // A director of the other demo ensemble, invited there and in no other ensemble.
  const other = accounts.find(a => a.role === 'director' && a.ensemble !== choir.ensemble)!
  const otherCookie = await app.login(other.email)
  const otherId = await ensembleId(app, otherCookie, other.ensemble)
  const sent = await app.fetch(`/api/ensembles/${otherId}/invitations`, json('POST', { email: brassDirector.email, role: 'director' }, otherCookie))
  if (sent.status !== 201) throw new Error(`invitation → ${sent.status}`)
  const token = linksIn((await latestMailTo(app, cookies[admin]!, brassDirector.email)).text)[0]!.split('/').pop()!
  const accepted = await app.fetch(`/api/invitations/${token}/accept`, json('POST', { name: 'Outside Director', password: 'outside director password' }))
  cookies[brassDirector.email] = accepted.headers.getSetCookie().map(c => c.split(';')[0]).join('; ')
  id = await ensembleId(app, cookies[choir.email]!, choir.ensemble)
})
afterAll(async () => { await app?.stop() })

const director = () => cookies[choir.email]!

describe('GET and PATCH /api/ensembles/:id', () => {
  it('answers the documented shape to members and 404 to another ensemble\'s director', async () => {
    const r = await app.fetch(`/api/ensembles/${id}`, { cookie: cookies[onlyPlayer.email] })
    expect(r.status).toBe(200)
    const e = await r.json()
    expect(Object.keys(e).sort()).toEqual(['a4', 'id', 'kind', 'name', 'role', 'sections', 'system', 'systemOptions', 'tolerance'])
    expect(e).toMatchObject({ id, name: choir.ensemble, role: 'player' })
    for (const s of e.sections) expect(Object.keys(s)).toEqual(expect.arrayContaining(['id', 'name', 'position', 'memberCount']))
    // Member counts per section agree with the README's demo table.
    const bySection = new Map<string, number>()
    const readme = (await import('node:fs')).readFileSync(new URL('../../README.md', import.meta.url), 'utf8')
    for (const m of readme.matchAll(/^\|\s*\S+@example\.org\s*\|\s*[^|]+\|\s*([^|]+?)\s*\|\s*([^|]*?)\s*\|/gm)) {
      if (m[1] === choir.ensemble && m[2]) bySection.set(m[2], (bySection.get(m[2]) ?? 0) + 1)
    }
    expect(Object.fromEntries(e.sections.map((s: { name: string, memberCount: number }) => [s.name, s.memberCount]))).toEqual(Object.fromEntries(bySection))
    expect((await app.fetch(`/api/ensembles/${id}`, { cookie: cookies[brassDirector.email] })).status).toBe(404)
    expect((await app.fetch('/api/ensembles/999999', { cookie: director() })).status).toBe(404)
    expect((await (await app.fetch(`/api/ensembles/${id}`, { cookie: cookies[admin] })).json()).role).toBe('admin')
  })

  it('lets the director change the settings and refuses bad values by field', async () => {
    const ok = await app.fetch(`/api/ensembles/${id}`, json('PATCH', { a4: 442, kind: 'choir', tolerance: 8, system: 'meantone', systemOptions: { fraction: '1/6' } }, director()))
    expect(ok.status).toBe(200)
    expect(await ok.json()).toMatchObject({ a4: 442, tolerance: 8, system: 'meantone', systemOptions: { fraction: '1/6' } })
    // A4 from 415 to 466 Hz: the range of reference pitches in use (common practice: 415 for baroque pitch, 466 a semitone above 440).
    for (const [body, field] of [[{ a4: 414.9 }, 'a4'], [{ a4: 466.1 }, 'a4'], [{ tolerance: 0 }, 'tolerance'], [{ kind: 'orchestra' }, 'kind'], [{ name: '  ' }, 'name'], [{ system: 'scala' }, 'systemOptions']] as const) {
      const bad = await errorOf(await app.fetch(`/api/ensembles/${id}`, json('PATCH', body, director())))
      expect(bad.status, JSON.stringify(body)).toBe(400)
      expect(bad.data.issues[0].path[0]).toBe(field)
      expect(JSON.stringify(bad)).not.toMatch(/undefined|\[object Object\]/)
    }
    expect((await (await app.fetch(`/api/ensembles/${id}`, { cookie: director() })).json()).a4).toBe(442)
    expect((await app.fetch(`/api/ensembles/${id}`, json('PATCH', { a4: 440 }, cookies[onlyPlayer.email]))).status).toBe(403)
    expect((await app.fetch(`/api/ensembles/${id}`, json('PATCH', { a4: 440 }, cookies[brassDirector.email]))).status).toBe(404)
  })
})

describe('sections', () => {
  it('adds, renames, reorders, merges and removes sections without leaving anyone out', async () => {
    const base = `/api/ensembles/${id}/sections`
    const add = await app.fetch(base, json('POST', { name: 'Descant' }, director()))
    expect(add.status).toBe(201)
    const descant = await add.json()
    const before = (await (await app.fetch(`/api/ensembles/${id}`, { cookie: director() })).json()).sections as { id: number, name: string, memberCount: number }[]
    const soprano = before.find(s => s.name === 'Soprano')!
    const alto = before.find(s => s.name === 'Alto')!
    // Renaming to a name in use, even in another case, is a conflict naming the field.
    const taken = await errorOf(await app.fetch(`${base}/${descant.id}`, json('PATCH', { name: 'alto' }, director())))
    expect(taken).toMatchObject({ status: 409, data: { code: 'section_name_taken' } })
    expect(taken.data.issues[0].path).toEqual(['name'])
    expect((await app.fetch(`${base}/${descant.id}`, json('PATCH', { name: 'Descants' }, director()))).status).toBe(200)

    const reversed = [...before.map(s => s.id)].reverse()
    const order = await app.fetch(`${base}/order`, json('POST', { ids: reversed }, director()))
    expect((await order.json()).map((s: { id: number }) => s.id)).toEqual(reversed)
    expect((await errorOf(await app.fetch(`${base}/order`, json('POST', { ids: reversed.slice(1) }, director())))).data.code).toBe('bad_order')

    // A section with members cannot simply vanish.
    const refused = await errorOf(await app.fetch(`${base}/${soprano.id}`, { method: 'DELETE', cookie: director() }))
    expect(refused).toMatchObject({ status: 409, data: { code: 'move_to_required' } })
    // Merge Soprano into Descants: every soprano now sits in Descants.
    const merged = await app.fetch(`${base}/${soprano.id}/merge`, json('POST', { intoId: descant.id }, director()))
    expect(merged.status).toBe(200)
    expect((await merged.json()).memberCount).toBe(soprano.memberCount)
    // Rename back and remove Alto, moving its members to the merged section.
    await app.fetch(`${base}/${descant.id}`, json('PATCH', { name: 'Soprano' }, director()))
    const del = await app.fetch(`${base}/${alto.id}?moveTo=${descant.id}`, { method: 'DELETE', cookie: director() })
    expect(del.status).toBe(204)
    const after = (await (await app.fetch(`/api/ensembles/${id}`, { cookie: director() })).json()).sections as { id: number, name: string, memberCount: number, position: number }[]
    expect(after.find(s => s.id === descant.id)!.memberCount).toBe(soprano.memberCount + alto.memberCount)
    expect(after.map(s => s.position)).toEqual(after.map((_, i) => i))
    const none = await (await app.fetch(`/api/ensembles/${id}/members?sectionId=none&role=player`, { cookie: director() })).json()
    expect(none.total).toBe(0)
    expect((await app.fetch(base, json('POST', { name: 'X' }, cookies[leader.email]))).status).toBe(403)
  })
})

describe('GET /api/ensembles/:id/members', () => {
  it('pages, searches, filters and sorts on the server; e-mail addresses only for the director', async () => {
    const all = await (await app.fetch(`/api/ensembles/${id}/members?pageSize=100`, { cookie: director() })).json()
    const inReadme = accounts.filter(a => a.ensemble === choir.ensemble)
    expect(all.total).toBe(inReadme.length)
    expect(Object.keys(all.items[0]).sort()).toEqual(['email', 'instrument', 'name', 'reads', 'readsFromAccount', 'role', 'section', 'sectionId', 'userId'])
    expect(all.onlySection).toBeNull()
    expect(all.items.map((m: { email: string }) => m.email).sort()).toEqual(inReadme.map(a => a.email).sort())

    const p1 = await (await app.fetch(`/api/ensembles/${id}/members?pageSize=5&page=1`, { cookie: director() })).json()
    const p3 = await (await app.fetch(`/api/ensembles/${id}/members?pageSize=5&page=3`, { cookie: director() })).json()
    expect(p1).toMatchObject({ total: inReadme.length, page: 1, pageSize: 5 })
    expect(p1.items).toHaveLength(5)
    expect(p3.items).toHaveLength(inReadme.length - 10)
    // Sorted by name without regard to case (common practice for a roster).
    const names = all.items.map((m: { name: string }) => m.name)
    expect(names).toEqual([...names].sort((a: string, b: string) => a.localeCompare(b, 'en', { sensitivity: 'base' })))
    const desc = await (await app.fetch(`/api/ensembles/${id}/members?sort=name&dir=desc&pageSize=100`, { cookie: director() })).json()
    expect(desc.items.map((m: { name: string }) => m.name)).toEqual([...names].reverse())

    const directors = await (await app.fetch(`/api/ensembles/${id}/members?role=director`, { cookie: director() })).json()
    expect(directors.items.map((m: { email: string }) => m.email)).toEqual([choir.email])
    const byMail = await (await app.fetch(`/api/ensembles/${id}/members?q=${encodeURIComponent(onlyPlayer.email.split('@')[0]!)}`, { cookie: director() })).json()
    expect(byMail.items.map((m: { email: string }) => m.email)).toEqual([onlyPlayer.email])

    const asPlayer = await (await app.fetch(`/api/ensembles/${id}/members?pageSize=100`, { cookie: cookies[onlyPlayer.email] })).json()
    expect(asPlayer.total).toBe(inReadme.length)
    for (const m of asPlayer.items) expect(m).not.toHaveProperty('email')
    expect(JSON.stringify(asPlayer)).not.toContain('@example.org')
    // A player's search does not match addresses, so it cannot test who is in the ensemble.
    expect((await (await app.fetch(`/api/ensembles/${id}/members?q=example.org`, { cookie: cookies[onlyPlayer.email] })).json()).total).toBe(0)
    expect((await app.fetch(`/api/ensembles/${id}/members`, { cookie: cookies[brassDirector.email] })).status).toBe(404)
    expect((await errorOf(await app.fetch(`/api/ensembles/${id}/members?pageSize=1000`, { cookie: director() }))).status).toBe(400)
  })
})

describe('who sees which members', () => {
  // The issue's rules: section leaders see their own section; players see the names and sections
  // of their ensemble but never an address (choirs include minors); directors and site admins see addresses.
  it('gives a section leader their own section only, without addresses', async () => {
    const all = await (await app.fetch(`/api/ensembles/${id}/members?pageSize=100`, { cookie: director() })).json()
    const me = all.items.find((m: { email: string }) => m.email === leader.email)
    expect(me.sectionId).not.toBeNull()
    const sameSection = all.items.filter((m: { sectionId: number | null }) => m.sectionId === me.sectionId)
    const r = await app.fetch(`/api/ensembles/${id}/members?pageSize=100`, { cookie: cookies[leader.email] })
    expect(r.status).toBe(200)
    const mine = await r.json()
    expect(mine.onlySection).toEqual({ sectionId: me.sectionId, section: me.section })
    expect(mine.total).toBe(sameSection.length)
    expect(mine.items.map((m: { userId: number }) => m.userId).sort()).toEqual(sameSection.map((m: { userId: number }) => m.userId).sort())
    expect(all.total).toBeGreaterThan(sameSection.length)
    for (const m of mine.items) expect(m).not.toHaveProperty('email')
    expect(JSON.stringify(mine)).not.toContain('@example.org')
    // A search by a name from another section finds nobody; asking for another section is refused by name.
    const outsider = all.items.find((m: { sectionId: number | null }) => m.sectionId !== me.sectionId && m.sectionId !== null)
    const found = await (await app.fetch(`/api/ensembles/${id}/members?q=${encodeURIComponent(outsider.name)}`, { cookie: cookies[leader.email] })).json()
    expect(found.items.filter((m: { userId: number }) => m.userId === outsider.userId)).toEqual([])
    const other = await errorOf(await app.fetch(`/api/ensembles/${id}/members?sectionId=${outsider.sectionId}`, { cookie: cookies[leader.email] }))
    expect(other).toMatchObject({ status: 403, data: { code: 'own_section_only' } })
    expect((await app.fetch(`/api/ensembles/${id}/members?sectionId=${me.sectionId}`, { cookie: cookies[leader.email] })).status).toBe(200)
  })

  it('gives players every name and section, and directors and site admins the addresses', async () => {
    const asPlayer = await (await app.fetch(`/api/ensembles/${id}/members?pageSize=100`, { cookie: cookies[onlyPlayer.email] })).json()
    const asAdmin = await (await app.fetch(`/api/ensembles/${id}/members?pageSize=100`, { cookie: cookies[admin] })).json()
    expect(asPlayer.onlySection).toBeNull()
    expect(asPlayer.items.map((m: { userId: number, name: string, section: string | null }) => [m.userId, m.name, m.section]))
      .toEqual(asAdmin.items.map((m: { userId: number, name: string, section: string | null }) => [m.userId, m.name, m.section]))
    for (const m of asPlayer.items) expect(m).not.toHaveProperty('email')
    for (const m of asAdmin.items) expect(m.email).toMatch(/@example\.org$/)
  })

  it('shows the account\'s concert or written choice wherever the membership sets none', async () => {
    const cookie = cookies[onlyPlayer.email]!
    const row = async () => (await (await app.fetch(`/api/ensembles/${id}/members?pageSize=100`, { cookie: director() })).json()).items
      .find((m: { email: string }) => m.email === onlyPlayer.email)
    const start = await row()
    if (!start.readsFromAccount) await app.fetch(`/api/ensembles/${id}/members/${start.userId}`, json('PATCH', { reads: null }, director()))
    for (const view of ['written', 'concert'] as const) {
      expect((await app.fetch('/api/account', json('PATCH', { pitchView: view }, cookie))).status).toBe(200)
      expect(await row()).toMatchObject({ reads: view, readsFromAccount: true })
    }
    // The director's setting for this ensemble wins over the account, until it is cleared again.
    await app.fetch(`/api/ensembles/${id}/members/${start.userId}`, json('PATCH', { reads: 'written' }, director()))
    expect(await row()).toMatchObject({ reads: 'written', readsFromAccount: false })
    const cleared = await app.fetch(`/api/ensembles/${id}/members/${start.userId}`, json('PATCH', { reads: null }, director()))
    expect(await cleared.json()).toMatchObject({ reads: 'concert', readsFromAccount: true })
    const bad = await errorOf(await app.fetch(`/api/ensembles/${id}/members/${start.userId}`, json('PATCH', { reads: 'sounding' }, director())))
    expect(bad).toMatchObject({ status: 400 })
    expect(bad.data.issues[0]).toMatchObject({ path: ['reads'] })
  })
})

describe('PATCH and DELETE /api/ensembles/:id/members/:userId', () => {
  it('changes role, section and instrument, and never lets the last director go', async () => {
    const all = await (await app.fetch(`/api/ensembles/${id}/members?pageSize=100`, { cookie: director() })).json()
    const me = all.items.find((m: { email: string }) => m.email === choir.email)
    const player = all.items.find((m: { email: string }) => m.email === onlyPlayer.email)
    const demote = await errorOf(await app.fetch(`/api/ensembles/${id}/members/${me.userId}`, json('PATCH', { role: 'player' }, director())))
    expect(demote).toMatchObject({ status: 409, data: { code: 'last_director' } })
    expect((await errorOf(await app.fetch(`/api/ensembles/${id}/members/${me.userId}`, { method: 'DELETE', cookie: director() }))).data.code).toBe('last_director')

    const changed = await app.fetch(`/api/ensembles/${id}/members/${player.userId}`, json('PATCH', { instrument: 'voice-alto', reads: 'concert' }, director()))
    expect(await changed.json()).toMatchObject({ instrument: 'voice-alto', reads: 'concert' })
    const bad = await errorOf(await app.fetch(`/api/ensembles/${id}/members/${player.userId}`, json('PATCH', { instrument: 'kazoo' }, director())))
    expect(bad.status).toBe(400)
    expect(bad.data.issues[0]).toMatchObject({ path: ['instrument'] })
    expect((await app.fetch(`/api/ensembles/${id}/members/${player.userId}`, json('PATCH', { role: 'director' }, cookies[onlyPlayer.email]))).status).toBe(403)
    expect((await app.fetch(`/api/ensembles/${id}/members/${player.userId}`, json('PATCH', { role: 'player' }, cookies[brassDirector.email]))).status).toBe(404)

    // With a second director, the first may step down; then the second is the last.
    await app.fetch(`/api/ensembles/${id}/members/${player.userId}`, json('PATCH', { role: 'director' }, director()))
    expect((await app.fetch(`/api/ensembles/${id}/members/${me.userId}`, json('PATCH', { role: 'section_leader' }, director()))).status).toBe(200)
    const again = await app.login(onlyPlayer.email)
    expect((await errorOf(await app.fetch(`/api/ensembles/${id}/members/${player.userId}`, json('PATCH', { role: 'player' }, again)))).data.code).toBe('last_director')
    await app.fetch(`/api/ensembles/${id}/members/${me.userId}`, json('PATCH', { role: 'director' }, again))
    await app.fetch(`/api/ensembles/${id}/members/${player.userId}`, json('PATCH', { role: 'player' }, director()))
    const audit = withDb(app, db => db.prepare("select action, data from audit_log where ensemble_id = ? and action = 'member.role_changed' order by id").all(id) as { action: string, data: string }[])
    expect(audit.map(a => JSON.parse(a.data))).toContainEqual({ before: { role: 'player' }, after: { role: 'director' } })
  })
})

describe('invitations', () => {
  const invitee = 'new.singer@example.org'

  it('mails one link, shows it publicly, accepts it once, and refuses members and reuse', async () => {
    const before = await mailCount(app, cookies[admin]!, invitee)
    const r = await app.fetch(`/api/ensembles/${id}/invitations`, json('POST', { email: ` ${invitee.toUpperCase()} `, role: 'player', sectionId: null }, director()))
    expect(r.status).toBe(201)
    const created = await r.json()
    expect(Object.keys(created).sort()).toEqual(['email', 'expiresAt', 'id'])
    expect(created.email).toBe(invitee)
    // Seven days by default.
    expect(Date.parse(created.expiresAt) - Date.now()).toBeGreaterThan(6.9 * 86400e3)
    const mail = await latestMailTo(app, cookies[admin]!, invitee, before)
    const links = linksIn(mail.text)
    expect(links).toHaveLength(1)
    expect(links[0]).toMatch(new RegExp(`^${app.url}/invitations/[A-Za-z0-9_-]{40,}$`))
    const token = links[0]!.split('/').pop()!

    const preview = await app.fetch(`/api/invitations/${token}`)
    expect(preview.status).toBe(200)
    expect(await preview.json()).toEqual({ ensemble: choir.ensemble, role: 'player', section: null, email: invitee, hasAccount: false })
    expect((await app.fetch(`/api/invitations/${token.slice(0, -2)}xx`)).status).toBe(404)

    const noName = await errorOf(await app.fetch(`/api/invitations/${token}/accept`, json('POST', { name: '', password: 'short' })))
    expect(noName.status).toBe(400)
    expect(noName.data.issues.map((i: { path: string[] }) => i.path[0]).sort()).toEqual(['name', 'password'])
    const accepted = await app.fetch(`/api/invitations/${token}/accept`, json('POST', { name: 'New Singer', password: 'a long enough password' }))
    expect(accepted.status).toBe(200)
    const cookie = accepted.headers.getSetCookie().map(c => c.split(';')[0]).join('; ')
    expect((await (await app.fetch('/api/ensembles', { cookie })).json()).map((e: { name: string }) => e.name)).toEqual([choir.ensemble])
    expect((await app.fetch(`/api/invitations/${token}/accept`, json('POST', { name: 'X', password: 'another password' }))).status).toBe(410)
    expect(await errorOf(await app.fetch(`/api/invitations/${token}`))).toMatchObject({ status: 410, data: { status: 'accepted' } })

    const dup = await errorOf(await app.fetch(`/api/ensembles/${id}/invitations`, json('POST', { email: invitee, role: 'player' }, director())))
    expect(dup).toMatchObject({ status: 409, data: { code: 'already_member' } })
    expect((await app.fetch(`/api/ensembles/${id}/invitations`, json('POST', { email: 'x@example.org', role: 'player' }, cookies[onlyPlayer.email]))).status).toBe(403)
  })

  it('answers 410 for revoked and expired links, and a resend replaces the link', async () => {
    const issue = async (email: string) => {
      const before = await mailCount(app, cookies[admin]!, email)
      const created = await (await app.fetch(`/api/ensembles/${id}/invitations`, json('POST', { email, role: 'section_leader' }, director()))).json()
      const mail = await latestMailTo(app, cookies[admin]!, email, before)
      return { id: created.id as number, token: linksIn(mail.text)[0]!.split('/').pop()! }
    }
    const revoked = await issue('revoked.one@example.org')
    expect((await app.fetch(`/api/ensembles/${id}/invitations/${revoked.id}/revoke`, json('POST', {}, director()))).status).toBe(200)
    expect(await errorOf(await app.fetch(`/api/invitations/${revoked.token}`))).toMatchObject({ status: 410, data: { status: 'revoked' } })

    const expired = await issue('expired.one@example.org')
    withDb(app, db => db.prepare('update invitations set expires_at = ? where id = ?').run(new Date(Date.now() - 1000).toISOString(), expired.id))
    expect(await errorOf(await app.fetch(`/api/invitations/${expired.token}`))).toMatchObject({ status: 410, data: { status: 'expired' } })
    const resent = await app.fetch(`/api/ensembles/${id}/invitations/${expired.id}/resend`, json('POST', {}, director()))
    expect(resent.status).toBe(200)
    const fresh = await latestMailTo(app, cookies[admin]!, 'expired.one@example.org', 1)
    const newToken = linksIn(fresh.text)[0]!.split('/').pop()!
    expect(newToken).not.toBe(expired.token)
    expect((await app.fetch(`/api/invitations/${newToken}`)).status).toBe(200)
    expect((await app.fetch(`/api/invitations/${expired.token}`)).status).toBe(404) // the old link no longer exists
    const open = await (await app.fetch(`/api/ensembles/${id}/invitations?status=open`, { cookie: director() })).json()
    expect(open.items.map((i: { email: string }) => i.email)).toContain('expired.one@example.org')
    expect(open.items.map((i: { email: string }) => i.email)).not.toContain('revoked.one@example.org')
  })

  it('asks an existing account to sign in, refuses another account, and adds the membership once signed in', async () => {
    const other = accounts.find(a => a.ensemble !== choir.ensemble && accounts.every(o => o.email !== a.email || o.ensemble !== choir.ensemble) && a.role !== 'site admin')!
    const before = await mailCount(app, cookies[admin]!, other.email)
    expect((await app.fetch(`/api/ensembles/${id}/invitations`, json('POST', { email: other.email, role: 'player' }, director()))).status).toBe(201)
    const token = linksIn((await latestMailTo(app, cookies[admin]!, other.email, before)).text)[0]!.split('/').pop()!
    expect(await (await app.fetch(`/api/invitations/${token}`)).json()).toMatchObject({ email: other.email, hasAccount: true })
    // Signed out: the account exists, so a name and password cannot take it over.
    const anon = await errorOf(await app.fetch(`/api/invitations/${token}/accept`, json('POST', { name: 'Someone', password: 'a takeover attempt' })))
    expect(anon).toMatchObject({ status: 401, data: { code: 'sign_in_required' } })
    const wrong = await errorOf(await app.fetch(`/api/invitations/${token}/accept`, json('POST', {}, cookies[onlyPlayer.email])))
    expect(wrong).toMatchObject({ status: 403, data: { code: 'wrong_account' } })
    const mine = await app.login(other.email)
    const ok = await app.fetch(`/api/invitations/${token}/accept`, json('POST', {}, mine))
    expect(ok.status).toBe(200)
    expect((await ok.json()).ensembleId).toBe(id)
    const names = (await (await app.fetch('/api/ensembles', { cookie: mine })).json()).map((e: { name: string }) => e.name)
    expect(names).toEqual(expect.arrayContaining([choir.ensemble, other.ensemble]))
    expect((await app.fetch(`/api/invitations/${token}/accept`, json('POST', {}, mine))).status).toBe(410)
  })

  it('treats a cookie that no longer signs anyone in as signed out', async () => {
    const email = 'stale.cookie@example.org'
    const before = await mailCount(app, cookies[admin]!, email)
    await app.fetch(`/api/ensembles/${id}/invitations`, json('POST', { email, role: 'player' }, director()))
    const token = linksIn((await latestMailTo(app, cookies[admin]!, email, before)).text)[0]!.split('/').pop()!
    const old = await app.login(leader.email)
    expect((await app.fetch('/api/auth/logout', { method: 'POST', cookie: old })).status).toBeLessThan(300)
    const r = await app.fetch(`/api/invitations/${token}/accept`, json('POST', { name: 'Stale Cookie', password: 'a long enough password' }, old))
    expect(r.status).toBe(200)
    expect((await r.json()).user.email).toBe(email)
  })

  it('stores only a hash of the token', async () => {
    const rows = withDb(app, db => db.prepare('select token_hash from invitations').all() as { token_hash: string }[])
    // SHA-256 digests are 32 bytes: 64 hex digits (FIPS 180-4).
    for (const r of rows) expect(r.token_hash).toMatch(/^[0-9a-f]{64}$/)
  })
})

describe('bulk invitations', () => {
  const url = () => `/api/ensembles/${id}/invitations`

  it('previews every row, sends nothing while rows are bad, then sends the good ones when confirmed', async () => {
    const existing = accounts.find(a => a.ensemble === choir.ensemble && a.role === 'player')!.email
    // A spreadsheet export: byte-order mark, semicolons, Windows line ends.
    const csv = '\uFEFFName;E-mail;Section;Role\r\nBea Good;bea.good@example.org;Tenor;player\r\nNo Mail;not-an-address;Bass;\r\nTwice;bea.good@example.org;Bass;\r\nMember;' + existing + ';Bass;\r\nLost;lost@example.org;Piccolo;\r\nCal Fine;cal.fine@example.org;;section leader\r\n'
    const pr = await app.fetch(`${url()}/bulk-preview`, json('POST', { csv }, director()))
    expect(pr.status).toBe(200)
    const preview = await pr.json()
    expect(preview.delimiter).toBe(';')
    expect(preview.rows.map((r: { line: number, problems: { code: string }[] }) => [r.line, r.problems.map(p => p.code)])).toEqual([
      [2, []], [3, ['bad_email']], [4, ['duplicate']], [5, ['existing_member']], [6, ['unknown_section']], [7, []],
    ])
    expect(preview).toMatchObject({ goodCount: 2, badCount: 4 })

    const refused = await errorOf(await app.fetch(`${url()}/bulk`, json('POST', { csv }, director())))
    expect(refused).toMatchObject({ status: 400, data: { code: 'bad_rows' } })
    expect(refused.message).toBe('4 of 6 rows have problems: nothing was sent')
    expect(await mailCount(app, cookies[admin]!, 'bea.good@example.org')).toBe(0)

    const sent = await app.fetch(`${url()}/bulk`, json('POST', { csv, sendGood: true }, director()))
    expect(sent.status).toBe(201)
    expect(await sent.json()).toMatchObject({ sent: 2, skipped: 4 })
    expect(linksIn((await latestMailTo(app, cookies[admin]!, 'cal.fine@example.org')).text)).toHaveLength(1)
  })

  it.each([
    ['a file without an e-mail column', 'name,section\nA,Bass\n', 'missing_columns', /no email column/],
    ['a file without a header line', 'A,a@example.org\n', 'missing_header', /first line must name the columns/],
    ['5,000 rows', `name,email\n${Array.from({ length: 5000 }, (_, i) => `P${i},p${i}@example.org`).join('\n')}`, 'too_many_rows', /5,000 rows; send at most 500/],
  ])('refuses %s with a message and sends nothing', async (_label, csv, code, message) => {
    for (const path of ['bulk-preview', 'bulk']) {
      const r = await errorOf(await app.fetch(`${url()}/${path}`, json('POST', { csv, sendGood: path === 'bulk' ? true : undefined }, director())))
      expect(r.status).toBe(400)
      expect(r.data.code).toBe(code)
      expect(r.message).toMatch(message)
    }
  })

  it('is for directors only', async () => {
    expect((await app.fetch(`${url()}/bulk-preview`, json('POST', { csv: 'name,email\n' }, cookies[leader.email]))).status).toBe(403)
    expect((await app.fetch(`${url()}/bulk`, json('POST', { csv: 'name,email\n' }, cookies[brassDirector.email]))).status).toBe(404)
  })
})
