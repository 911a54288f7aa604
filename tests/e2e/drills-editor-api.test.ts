// The drill writing API against the built app: create, read with its version, save a new version,
// a stale save refused with version_conflict, clear field messages, who may do what, and copy,
// archive (takes kept) and restore.
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { startApp, type App } from './harness'

let app: App
let director: string
let player: string
let outsider: string
let choirId: number

const doc = (title: string) => ({
  title,
  key: 'F major',
  tempo: 72,
  system: { name: 'just-root' },
  parts: [{ name: 'Soprano' }, { name: 'Alto' }, { name: 'Tenor', instrument: 'voice-tenor' }, { name: 'Bass' }],
  chords: [
    { beats: 4, notes: { Soprano: 'A4', Alto: 'F4', Tenor: 'C4', Bass: 'F3' } },
    { beats: 4, notes: { Soprano: 'Bb4', Alto: 'F4', Tenor: 'D4', Bass: 'Bb2' } },
  ],
})

const json = (cookie: string, method: string, body: unknown) => ({ method, cookie, headers: { 'content-type': 'application/json' }, body: typeof body === 'string' ? body : JSON.stringify(body) })

beforeAll(async () => {
  app = await startApp()
  director = await app.login('helena.marsh@example.org')
  player = await app.login('clara.lindqvist@example.org')
  outsider = await app.login('lena.fischer@example.org') // brass only
  const ensembles = await (await app.fetch('/api/ensembles', { cookie: director })).json() as { id: number, role: string }[]
  choirId = ensembles.find(e => e.role === 'director')!.id
})
afterAll(async () => { await app?.stop() })

describe('create, read, save versions', () => {
  it('creates (201 id+version), reads the version, saves version 2, refuses a stale version 1 with 409', async () => {
    const created = await app.fetch(`/api/ensembles/${choirId}/drills`, json(director, 'POST', doc('Plagal pair')))
    expect(created.status).toBe(201)
    const { id, version } = await created.json() as { id: number, version: number }
    expect(version).toBe(1)

    const got = await (await app.fetch(`/api/drills/${id}`, { cookie: director })).json() as { version: number, document: { title: string, chords: unknown[] } }
    expect(got.version).toBe(1)
    expect(got.document.title).toBe('Plagal pair')

    const saved = await app.fetch(`/api/drills/${id}`, json(director, 'PUT', { document: doc('Plagal pair, held longer'), version: 1 }))
    expect(saved.status).toBe(200)
    expect(await saved.json()).toEqual({ version: 2 })

    // A second editor still holding version 1 is refused and told which version is stored.
    const stale = await app.fetch(`/api/drills/${id}`, json(director, 'PUT', { document: doc('Silent overwrite'), version: 1 }))
    expect(stale.status).toBe(409)
    const body = await stale.json() as { statusMessage: string, data: { code: string, currentVersion: number, updatedBy: string } }
    expect(body.data).toMatchObject({ code: 'version_conflict', currentVersion: 2, updatedBy: 'Helena Marsh' })
    expect(body.statusMessage).toBe('The drill was changed by someone else')
    const after = await (await app.fetch(`/api/drills/${id}`, { cookie: director })).json() as { version: number, document: { title: string } }
    expect(after).toMatchObject({ version: 2, document: { title: 'Plagal pair, held longer' } })
  })
})

describe('bad input names the field', () => {
  it('an empty chord, a missing note and an unknown note are named by chord and part; nothing is saved', async () => {
    const before = (await (await app.fetch(`/api/ensembles/${choirId}/drills`, { cookie: director })).json() as unknown[]).length
    const empty = { ...doc('Empty'), chords: [doc('x').chords[0], { beats: 2, notes: {} }] }
    let r = await app.fetch(`/api/ensembles/${choirId}/drills`, json(director, 'POST', empty))
    expect(r.status).toBe(400)
    let issues = (await r.json() as { data: { issues: { path: (string | number)[], message: string }[] } }).data.issues
    expect(issues).toContainEqual(expect.objectContaining({ path: ['chords', 1, 'notes'], message: 'chord 2 is empty: give every part a note or a rest' }))

    const missing = { ...doc('Missing'), chords: [{ beats: 2, notes: { Soprano: 'A4', Alto: 'F4', Tenor: 'C4' } }] }
    r = await app.fetch(`/api/ensembles/${choirId}/drills`, json(director, 'POST', missing))
    issues = (await r.json() as { data: { issues: { path: (string | number)[], message: string }[] } }).data.issues
    expect(issues).toContainEqual(expect.objectContaining({ path: ['chords', 0, 'notes', 'Bass'], message: 'chord 1 has no note or rest for part "Bass"' }))

    const bad = { ...doc('Bad'), chords: [{ beats: 2, notes: { Soprano: 'H4', Alto: 'F4', Tenor: 'C4', Bass: 'F3' } }] }
    r = await app.fetch(`/api/ensembles/${choirId}/drills`, json(director, 'POST', bad))
    const text = await r.text()
    expect(r.status).toBe(400)
    expect(text).toContain('chord 1, part \\"Soprano\\"')
    expect(text).not.toMatch(/undefined|\[object Object\]|at .*\.(ts|js|mjs):\d+/)

    r = await app.fetch(`/api/ensembles/${choirId}/drills`, json(director, 'POST', '{"title": '))
    expect(r.status).toBe(400)
    expect((await r.json() as { data: { code: string } }).data.code).toBe('invalid_json')

    r = await app.fetch(`/api/drills/1`, json(director, 'PUT', { document: doc('No version') }))
    expect(r.status).toBe(400)
    expect(await r.text()).toContain('the version the drill was opened at is required')

    const after = (await (await app.fetch(`/api/ensembles/${choirId}/drills`, { cookie: director })).json() as unknown[]).length
    expect(after).toBe(before)
  })
})

describe('who may write drills', () => {
  it('a player gets 403; someone outside the ensemble gets 404 for the ensemble and its drills', async () => {
    const created = await (await app.fetch(`/api/ensembles/${choirId}/drills`, json(director, 'POST', doc('Roles')))).json() as { id: number }
    expect((await app.fetch(`/api/ensembles/${choirId}/drills`, json(player, 'POST', doc('x')))).status).toBe(403)
    expect((await app.fetch(`/api/drills/${created.id}`, json(player, 'PUT', { document: doc('x'), version: 1 }))).status).toBe(403)
    expect((await app.fetch(`/api/drills/${created.id}/archive`, { method: 'POST', cookie: player })).status).toBe(403)
    expect((await app.fetch(`/api/ensembles/${choirId}/drills?status=archived`, { cookie: player })).status).toBe(403)
    expect((await app.fetch(`/api/ensembles/${choirId}/drills/defaults`, { cookie: player })).status).toBe(403)

    expect((await app.fetch(`/api/ensembles/${choirId}/drills`, json(outsider, 'POST', doc('x')))).status).toBe(404)
    expect((await app.fetch(`/api/drills/${created.id}`, json(outsider, 'PUT', { document: doc('x'), version: 1 }))).status).toBe(404)
    expect((await app.fetch(`/api/drills/${created.id}/duplicate`, { method: 'POST', cookie: outsider })).status).toBe(404)
    expect((await app.fetch(`/api/drills/${created.id}/archive`, { method: 'POST', cookie: outsider })).status).toBe(404)
  })
})

describe('defaults, search, copy, archive and restore', () => {
  it('a new drill starts from the ensemble: its reference pitch, tolerance, system and sections', async () => {
    const r = await app.fetch(`/api/ensembles/${choirId}/drills/defaults`, { cookie: director })
    expect(r.status).toBe(200)
    const d = await r.json() as { document: { a4: number, tolerance: number, parts: { name: string }[], chords: unknown[] } }
    expect(d.document.parts.map(p => p.name)).toEqual(['Soprano', 'Alto', 'Tenor', 'Bass'])
    expect(d.document.a4).toBeGreaterThanOrEqual(415)
    expect(d.document.chords).toHaveLength(1)
  })

  it('copies a drill, archives one with takes (kept, listed as archived), restores it', async () => {
    const list = await (await app.fetch(`/api/ensembles/${choirId}/drills`, { cookie: director })).json() as { id: number, title: string, takes: number }[]
    const withTakes = list.find(d => d.takes > 0)!
    expect(withTakes, 'the demo has a drill with takes').toBeTruthy()

    const copy = await app.fetch(`/api/drills/${withTakes.id}/duplicate`, { method: 'POST', cookie: director })
    expect(copy.status).toBe(201)
    const copied = await copy.json() as { id: number, version: number }
    expect(copied.version).toBe(1)
    const copyDoc = await (await app.fetch(`/api/drills/${copied.id}`, { cookie: director })).json() as { document: { title: string } }
    expect(copyDoc.document.title).toBe(`${withTakes.title} (copy)`)

    const archived = await app.fetch(`/api/drills/${withTakes.id}/archive`, { method: 'POST', cookie: director })
    expect(archived.status).toBe(200)
    expect((await archived.json() as { archivedAt: string | null }).archivedAt).toBeTruthy()
    const active = await (await app.fetch(`/api/ensembles/${choirId}/drills`, { cookie: director })).json() as { id: number }[]
    expect(active.map(d => d.id)).not.toContain(withTakes.id)
    const arch = await (await app.fetch(`/api/ensembles/${choirId}/drills?status=archived`, { cookie: director })).json() as { id: number, takes: number }[]
    expect(arch).toContainEqual(expect.objectContaining({ id: withTakes.id, takes: withTakes.takes }))
    const takes = await (await app.fetch(`/api/takes?drillId=${withTakes.id}`, { cookie: director })).json() as { total: number }
    expect(takes.total).toBe(withTakes.takes)
    // An archived drill is not edited until restored.
    const edit = await app.fetch(`/api/drills/${withTakes.id}`, json(director, 'PUT', { document: doc('x'), version: 1 }))
    expect(edit.status).toBe(409)

    expect((await app.fetch(`/api/drills/${withTakes.id}/restore`, { method: 'POST', cookie: director })).status).toBe(200)
    const again = await (await app.fetch(`/api/ensembles/${choirId}/drills`, { cookie: director })).json() as { id: number }[]
    expect(again.map(d => d.id)).toContain(withTakes.id)
  })

  it('searches by title and part name', async () => {
    await app.fetch(`/api/ensembles/${choirId}/drills`, json(director, 'POST', { ...doc('Zephyr cadence') }))
    const found = await (await app.fetch(`/api/ensembles/${choirId}/drills?q=zephyr`, { cookie: director })).json() as { title: string }[]
    expect(found.map(d => d.title)).toEqual(['Zephyr cadence'])
    const none = await (await app.fetch(`/api/ensembles/${choirId}/drills?q=${encodeURIComponent('no such drill %')}`, { cookie: director })).json() as unknown[]
    expect(none).toEqual([])
    const tooLong = await app.fetch(`/api/ensembles/${choirId}/drills?q=${'x'.repeat(121)}`, { cookie: director })
    expect(tooLong.status).toBe(400)
  })
})
