// The admin API against the built app: users, ensembles with a first director invited by
// e-mail, and the audit log. Status codes follow HTTP semantics (RFC 9110 §15: 201 Created,
// 400 Bad Request, 401 Unauthorized, 403 Forbidden, 404 Not Found, 409 Conflict).
import { createHash } from 'node:crypto'
import { join } from 'node:path'
import Database from 'better-sqlite3'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { demoAccounts, startApp, type App } from './harness'

type Json = Record<string, any>
const accounts = demoAccounts()
const emailOf = (role: string, n = 0) => accounts.filter(a => a.role === role)[n]!.email
const send = (method: string, body: unknown) => ({ method, headers: { 'content-type': 'application/json' }, body: JSON.stringify(body) })

let app: App
let admin: string
const get = async (path: string, cookie = admin) => {
  const r = await app.fetch(path, { cookie })
  return { status: r.status, body: await r.json() as Json }
}
const call = async (method: string, path: string, body: unknown, cookie = admin) => {
  const r = await app.fetch(path, { ...send(method, body), cookie })
  return { status: r.status, body: r.status === 204 ? {} : await r.json() as Json }
}
async function userId (email: string): Promise<number> {
  const { body } = await get(`/api/admin/users?q=${encodeURIComponent(email)}`)
  const u = body.items.find((i: Json) => i.email === email)
  if (!u) throw new Error(`no user ${email}`)
  return u.id
}
async function mailTo (address: string): Promise<{ text: string, html: string | null, subject: string }> {
  for (let i = 0; i < 50; i++) {
    const list = (await get('/api/dev/mail')).body as unknown as { id: string, to: string }[]
    const m = list.find(x => x.to.includes(address))
    if (m) return (await get(`/api/dev/mail/${m.id}`)).body as never
    await new Promise(r => setTimeout(r, 100))
  }
  throw new Error(`no mail to ${address}`)
}

beforeAll(async () => {
  app = await startApp()
  admin = await app.login(emailOf('site admin'))
})
afterAll(async () => { await app?.stop() })

describe('admin users', () => {
  it('searches by part of a name or an address, in any case, and pages without gaps or repeats', async () => {
    const someone = accounts.find(a => a.role === 'player')!.email
    const local = someone.split('@')[0]!
    const byMail = await get(`/api/admin/users?q=${encodeURIComponent(local.toUpperCase())}`)
    expect(byMail.status).toBe(200)
    expect(byMail.body.items.map((u: Json) => u.email)).toContain(someone)
    const first = byMail.body.items.find((u: Json) => u.email === someone)
    expect(Object.keys(first).sort()).toEqual(['createdAt', 'disabled', 'disabledAt', 'email', 'ensembleCount', 'id', 'lastLoginAt', 'name', 'siteAdmin'])
    const byName = await get(`/api/admin/users?q=${encodeURIComponent(first.name.split(' ')[1].toLowerCase())}`)
    expect(byName.body.items.map((u: Json) => u.id)).toContain(first.id)

    const everyone = new Set(accounts.map(a => a.email))
    const all = await get('/api/admin/users?pageSize=100')
    expect(all.body.total).toBe(everyone.size)
    const seen: number[] = []
    for (let page = 1; page <= Math.ceil(all.body.total / 4); page++) {
      const p = await get(`/api/admin/users?pageSize=4&page=${page}`)
      expect(p.body).toMatchObject({ page, pageSize: 4, total: all.body.total })
      seen.push(...p.body.items.map((u: Json) => u.id))
    }
    expect(seen).toEqual(all.body.items.map((u: Json) => u.id))
    expect((await get(`/api/admin/users?page=${Math.ceil(everyone.size / 4) + 1}&pageSize=4`)).body.items).toEqual([])
    expect((await get('/api/admin/users?status=admin')).body.items.map((u: Json) => u.email)).toEqual([emailOf('site admin')])
  })

  it('refuses bad queries and bodies with 400 and names the field', async () => {
    expect((await get('/api/admin/users?page=0')).status).toBe(400)
    expect((await get('/api/admin/users?status=sleeping')).status).toBe(400)
    const id = await userId(emailOf('player'))
    for (const body of [{}, { disabled: 'yes' }, { disabled: true, siteAdmin: true }, { role: 'director' }, []]) {
      const r = await call('PATCH', `/api/admin/users/${id}`, body)
      expect(r.status, JSON.stringify(body)).toBe(400)
      expect(r.body.data.code).toBe('invalid_input')
    }
    expect((await call('PATCH', '/api/admin/users/abc', { disabled: true })).status).toBe(400)
    expect((await call('PATCH', '/api/admin/users/999999', { disabled: true })).status).toBe(404)
  })

  it('disables an account: its live session is refused at once, and restoring it does not revive that session', async () => {
    const email = emailOf('player', 2)
    const live = await app.login(email)
    expect((await get('/api/home', live)).status).toBe(200)
    const id = await userId(email)

    const off = await call('PATCH', `/api/admin/users/${id}`, { disabled: true })
    expect(off.status).toBe(200)
    expect(off.body).toMatchObject({ id, email, disabled: true })
    expect(Date.parse(off.body.disabledAt)).toBeGreaterThan(0)
    expect((await get('/api/home', live)).status).toBe(401)
    expect((await get('/api/account', live)).status).toBe(401)
    await expect(app.login(email)).rejects.toThrow(/401/)

    const on = await call('PATCH', `/api/admin/users/${id}`, { disabled: false })
    expect(on.body).toMatchObject({ id, disabled: false, disabledAt: null })
    expect((await get('/api/home', live)).status).toBe(401)
    expect((await get('/api/home', await app.login(email))).status).toBe(200)

    const audit = await get(`/api/admin/audit?action=user&pageSize=10`)
    const [restored, disabled] = audit.body.items.filter((i: Json) => i.target?.id === id)
    expect(restored).toMatchObject({ action: 'user.restored', before: { disabled: true }, after: { disabled: false }, target: { type: 'user', id } })
    expect(disabled).toMatchObject({ action: 'user.disabled', before: { disabled: false }, after: { disabled: true } })
    expect(disabled.actor).toBeTypeOf('string')
  })

  it('grants and removes site admin, and refuses changes to the admin\'s own account', async () => {
    const director = emailOf('director')
    const cookie = await app.login(director)
    expect((await get('/api/admin/users', cookie)).status).toBe(403)
    const id = await userId(director)
    expect((await call('PATCH', `/api/admin/users/${id}`, { siteAdmin: true })).body).toMatchObject({ siteAdmin: true })
    expect((await get('/api/admin/users', cookie)).status).toBe(200)
    expect((await call('PATCH', `/api/admin/users/${id}`, { siteAdmin: false })).body).toMatchObject({ siteAdmin: false })
    expect((await get('/api/admin/users', cookie)).status).toBe(403)

    const self = await userId(emailOf('site admin'))
    for (const body of [{ disabled: true }, { siteAdmin: false }]) {
      const r = await call('PATCH', `/api/admin/users/${self}`, body)
      expect(r.status).toBe(409)
      expect(r.body.data.code).toBe('own_account')
    }
    expect((await get('/api/admin/users')).status).toBe(200)
  })
})

describe('admin ensembles', () => {
  it('creates an ensemble and mails its first director one single-use link whose hash alone is stored', async () => {
    const directorEmail = 'new.director@example.org'
    const r = await call('POST', '/api/admin/ensembles', { name: '  Harbour Lights Singers ', kind: 'choir', directorEmail: ' New.Director@Example.org ' })
    expect(r.status).toBe(201)
    expect(r.body).toMatchObject({ name: 'Harbour Lights Singers', kind: 'choir', archived: false, memberCount: 0, directors: [], pendingDirectorInvitations: [directorEmail] })
    expect(r.body.invitation.email).toBe(directorEmail)
    const week = 7 * 86400_000
    expect(Math.abs(Date.parse(r.body.invitation.expiresAt) - (Date.now() + week))).toBeLessThan(5 * 60_000)
    expect(JSON.stringify(r.body)).not.toMatch(/token/i)

    const mail = await mailTo(directorEmail)
    expect(mail.subject).toContain('Harbour Lights Singers')
    const links = new Set([...`${mail.text} ${mail.html ?? ''}`.matchAll(/https?:\/\/[^\s"<>]+/g)].map(m => m[0]))
    expect(links.size).toBe(1)
    const link = [...links][0]!
    expect(link.startsWith(`${app.url}/invitations/`)).toBe(true)
    const token = decodeURIComponent(link.slice(`${app.url}/invitations/`.length))
    expect(token.length).toBeGreaterThanOrEqual(32)

    // Stored as its SHA-256 (node:crypto as the reference implementation), never as the token.
    const db = new Database(join(app.dir, 'driftline.sqlite'), { readonly: true, fileMustExist: true })
    try {
      const row = db.prepare('select * from invitations where id = ?').get(r.body.invitation.id) as Json
      expect(row).toMatchObject({ ensemble_id: r.body.id, email: directorEmail, role: 'director', accepted_at: null, revoked_at: null })
      expect(row.token_hash).toBe(createHash('sha256').update(token).digest('hex'))
      expect(JSON.stringify(db.prepare('select * from invitations').all())).not.toContain(token)
    } finally {
      db.close()
    }

    const audit = await get(`/api/admin/audit?ensembleId=${r.body.id}`)
    expect(audit.body.items.map((i: Json) => i.action)).toEqual(['invitation.created', 'ensemble.created'])
    expect(audit.body.items[1]).toMatchObject({ target: { type: 'ensemble', id: r.body.id, label: 'Harbour Lights Singers' }, after: { name: 'Harbour Lights Singers', kind: 'choir' } })
  })

  it('refuses a bad address, a missing kind and a name in use, and creates nothing', async () => {
    const before = (await get('/api/admin/ensembles')).body.total
    const bad = await call('POST', '/api/admin/ensembles', { name: 'Quay Singers', kind: 'choir', directorEmail: 'not-an-address' })
    expect(bad.status).toBe(400)
    expect(bad.body.data.issues.map((i: Json) => i.path.join('.'))).toEqual(['directorEmail'])
    const noKind = await call('POST', '/api/admin/ensembles', { name: 'Quay Singers', directorEmail: 'q@example.org' })
    expect(noKind.body.data.issues.map((i: Json) => i.path.join('.'))).toEqual(['kind'])
    const taken = accounts.find(a => a.role === 'director')!.ensemble
    const dup = await call('POST', '/api/admin/ensembles', { name: taken.toUpperCase(), kind: 'choir', directorEmail: 'q@example.org' })
    expect(dup.status).toBe(409)
    expect(dup.body.data.code).toBe('name_taken')
    expect((await get('/api/admin/ensembles')).body.total).toBe(before)
  })

  it('archives and restores an ensemble, with the filter and the audit following', async () => {
    const list = await get('/api/admin/ensembles?q=copperfield')
    const e = list.body.items[0]
    expect(e.directors.length).toBeGreaterThan(0)
    const archived = await call('PATCH', `/api/admin/ensembles/${e.id}`, { archived: true })
    expect(archived.body).toMatchObject({ id: e.id, archived: true })
    expect((await get('/api/admin/ensembles?archived=archived')).body.items.map((x: Json) => x.id)).toContain(e.id)
    expect((await get('/api/admin/ensembles?archived=open')).body.items.map((x: Json) => x.id)).not.toContain(e.id)
    expect((await call('PATCH', `/api/admin/ensembles/${e.id}`, { archived: false })).body).toMatchObject({ archived: false, archivedAt: null })
    expect((await call('PATCH', `/api/admin/ensembles/${e.id}`, { archived: 'no' })).status).toBe(400)
    expect((await call('PATCH', '/api/admin/ensembles/999999', { archived: true })).status).toBe(404)
    const audit = await get(`/api/admin/audit?action=ensemble&ensembleId=${e.id}`)
    expect(audit.body.items.slice(0, 2).map((i: Json) => [i.action, i.before, i.after])).toEqual([
      ['ensemble.restored', { archived: true }, { archived: false }],
      ['ensemble.archived', { archived: false }, { archived: true }],
    ])
  })
})

describe('audit log', () => {
  it('answers the documented shape, newest first, in pages that add up to the total', async () => {
    const all = await get('/api/admin/audit?pageSize=100')
    expect(all.status).toBe(200)
    expect(all.body.total).toBeGreaterThan(5)
    for (const item of all.body.items) {
      expect(Object.keys(item).sort()).toEqual(['action', 'actor', 'actorId', 'after', 'at', 'before', 'ensembleId', 'id', 'target'])
    }
    const ids: number[] = all.body.items.map((i: Json) => i.id)
    expect(ids).toEqual([...ids].sort((a, b) => b - a))
    const p1 = await get('/api/admin/audit?pageSize=3&page=1')
    const p2 = await get('/api/admin/audit?pageSize=3&page=2')
    expect([...p1.body.items, ...p2.body.items].map((i: Json) => i.id)).toEqual(ids.slice(0, 6))
    expect(p1.body.total).toBe(all.body.total)
  })

  it('filters by action or action family, by actor and by ensemble', async () => {
    const family = await get('/api/admin/audit?action=user')
    expect(family.body.items.length).toBeGreaterThan(0)
    expect(family.body.items.every((i: Json) => i.action.startsWith('user.'))).toBe(true)
    const exact = await get('/api/admin/audit?action=user.disabled')
    expect(exact.body.items.every((i: Json) => i.action === 'user.disabled')).toBe(true)
    // "user" must not match a longer word that merely starts with it.
    expect((await get('/api/admin/audit?action=use')).body.total).toBe(0)

    const adminId = await userId(emailOf('site admin'))
    const byActor = await get(`/api/admin/audit?actorId=${adminId}&pageSize=100`)
    expect(byActor.body.items.every((i: Json) => i.actorId === adminId)).toBe(true)
    const facets = await get('/api/admin/audit/facets')
    expect(facets.body.actions).toContain('ensemble.created')
    expect(facets.body.actors.map((a: Json) => a.id)).toContain(adminId)
    // Empty filters are no filter (a form sends every field).
    expect((await get('/api/admin/audit?action=&actorId=&ensembleId=')).body.total).toBe((await get('/api/admin/audit')).body.total)
    for (const q of ['page=0', 'page=x', 'actorId=-1', 'ensembleId=1.5', 'action=DROP%20TABLE']) {
      expect((await get(`/api/admin/audit?${q}`)).status, q).toBe(400)
    }
  })

  it('is for site admins only', async () => {
    for (const role of ['director', 'section leader', 'player']) {
      expect((await get('/api/admin/audit', await app.login(emailOf(role)))).status, role).toBe(403)
    }
    expect((await app.fetch('/api/admin/audit')).status).toBe(401)
  })
})
