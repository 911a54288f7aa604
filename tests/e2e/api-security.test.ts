// Security properties of the built app: the embedded object store, sessions, request bodies,
// answers under /api/, ids, byte ranges, parser errors, user text, development services beside
// real ones, and sign-in throttling per account and client address.
import { request as httpRequest } from 'node:http'
import { mkdtempSync, rmSync, statSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { demoAccounts, demoPassword, startApp, type App } from './harness'
import { dbQuery, ensembleId, importDrill, postTake, triadDrill, triadTake } from './takes-helpers'
import { embeddedCredentials, startEmbeddedS3, type EmbeddedS3 } from '../../server/services/object-store'

const json = (body: unknown) => ({ method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify(body) })
const accounts = demoAccounts()
const pick = (role: string, n = 0) => accounts.filter(a => a.role === role)[n]!.email
/** Words of an internal failure that must never reach a person. */
const INTERNAL = /undefined|\[object Object\]|Cannot read|is not a function|Unexpected token|SyntaxError|TypeError|at position/

let app: App
beforeAll(async () => { app = await startApp() })
afterAll(async () => { await app?.stop() })

describe('embedded object store', () => {
  it('names its address in the log and refuses every unsigned request', async () => {
    const m = /\[storage\] embedded object store on (http:\/\/127\.0\.0\.1:\d+)/.exec(app.output())
    expect(m, app.output()).not.toBeNull()
    const store = m![1]!
    const key = dbQuery<{ object_key: string }>(app, 'select object_key from takes limit 1')[0]!.object_key
    for (const [method, path] of [['GET', '/'], ['GET', '/driftline'], ['GET', `/driftline/${key}`], ['HEAD', `/driftline/${key}`], ['DELETE', `/driftline/${key}`]] as const) {
      expect((await fetch(store + path, { method })).status, `${method} ${path}`).toBe(403)
    }
    expect((await fetch(`${store}/driftline/${key}`, { method: 'PUT', body: 'overwritten' })).status).toBe(403)
    // The keys were generated for this install and only its owner may read them.
    expect(statSync(join(app.dir, 'object-store-credentials')).mode & 0o077).toBe(0)
  })
})

describe('sessions', () => {
  it('DELETE /api/_auth/session revokes the cookie, and GET then answers signed out', async () => {
    const cookie = await app.login(pick('player'))
    const before = await (await app.fetch('/api/_auth/session', { cookie })).json() as { user?: { email: string } }
    expect(before.user?.email).toBe(pick('player'))
    expect((await app.fetch('/api/_auth/session', { method: 'DELETE', cookie })).status).toBe(200)
    // The browser dropped the cookie; a copy of it is worth nothing now.
    expect(await (await app.fetch('/api/_auth/session', { cookie })).json()).toEqual({})
    expect((await app.fetch('/api/home', { cookie })).status).toBe(401)
  })

  it('GET /api/_auth/session answers signed out for a cookie revoked by our sign-out', async () => {
    const cookie = await app.login(pick('player', 1))
    expect((await app.fetch('/api/auth/logout', { method: 'POST', cookie })).status).toBe(200)
    expect(await (await app.fetch('/api/_auth/session', { cookie })).json()).toEqual({})
  })

  it('issues a new session id at every sign-in and ends the session the browser carried', async () => {
    const email = pick('player', 2)
    const first = await app.login(email)
    const id1 = (await (await app.fetch('/api/_auth/session', { cookie: first })).json() as { id: string }).id
    const r = await app.fetch('/api/auth/login', { ...json({ email, password: demoPassword() }), cookie: first })
    expect(r.status).toBe(200)
    const second = r.headers.getSetCookie().map(c => c.split(';')[0]).join('; ')
    const id2 = (await (await app.fetch('/api/_auth/session', { cookie: second })).json() as { id: string }).id
    expect(id1).toMatch(/^[0-9a-f-]{36}$/)
    expect(id2).toMatch(/^[0-9a-f-]{36}$/)
    expect(id2).not.toBe(id1)
    expect((await app.fetch('/api/home', { cookie: first })).status).toBe(401)
    expect((await app.fetch('/api/home', { cookie: second })).status).toBe(200)
  })
})

describe('request bodies', () => {
  it.each([
    ['text/plain', 'text/plain;charset=UTF-8'],
    ['a form', 'application/x-www-form-urlencoded'],
    ['no type', null],
  ])('answers 415 to a JSON route sent %s', async (_, type) => {
    const headers: Record<string, string> = type ? { 'content-type': type } : {}
    const r = await postRaw(app.url, '/api/auth/login', JSON.stringify({ email: 'nobody@example.org', password: 'x' }), headers)
    expect(r.status).toBe(415)
    expect(JSON.parse(r.body).data).toEqual({ code: 'unsupported_media_type', expected: 'application/json' })
  })

  it('answers 415 to a multipart body on a JSON route, and still takes JSON with a charset', async () => {
    const form = new FormData()
    form.append('email', 'nobody@example.org')
    form.append('password', 'x')
    expect((await app.fetch('/api/auth/login', { method: 'POST', body: form })).status).toBe(415)
    const r = await app.fetch('/api/auth/login', { method: 'POST', headers: { 'content-type': 'application/json; charset=utf-8' }, body: JSON.stringify({ email: 'nobody@example.org', password: 'x' }) })
    expect(r.status).toBe(401)
  })
})

describe('answers under /api/', () => {
  it('answers 401 as JSON without a session, never a redirect', async () => {
    const r = await app.fetch('/api/home', { headers: { accept: 'text/html' } })
    expect(r.status).toBe(401)
    expect(r.headers.get('location')).toBeNull()
    expect(r.headers.get('content-type')).toMatch(/application\/json/)
  })

  it.each(['/api/nothing', '/api/takes/1/nothing', '/api', '/api/'])('answers 404 as JSON for %s, signed in or not', async (path) => {
    const cookie = await app.login(pick('director'))
    for (const c of [undefined, cookie]) {
      const r = await app.fetch(path, { cookie: c, headers: { accept: 'text/html' } })
      expect(r.status).toBe(404)
      expect(r.headers.get('content-type')).toMatch(/application\/json/)
      expect((await r.json() as { data: { code: string } }).data.code).toBe('not_found')
    }
  })

  it('answers 405 with Allow for a method the route lacks', async () => {
    const cookie = await app.login(pick('director'))
    const put = await app.fetch('/api/home', { method: 'PUT', cookie })
    expect(put.status).toBe(405)
    expect(put.headers.get('allow')).toBe('GET, HEAD')
    expect((await put.json() as { data: { code: string } }).data.code).toBe('method_not_allowed')
    const del = await app.fetch('/api/auth/login', { method: 'DELETE' })
    expect(del.status).toBe(405)
    expect(del.headers.get('allow')).toBe('POST')
    const head = await app.fetch('/api/home', { method: 'HEAD', cookie })
    expect(head.status).toBe(200)
  })

  it('writes no router warnings to the log', () => {
    expect(app.output()).not.toMatch(/Vue Router warn|No match found/)
  })
})

describe('headers', () => {
  it('gives pages a policy with frame-ancestors \'none\', HSTS, and no x-powered-by', async () => {
    const r = await app.fetch('/login')
    expect(r.headers.get('content-type')).toMatch(/text\/html/)
    const csp = r.headers.get('content-security-policy') ?? ''
    expect(csp).toContain("frame-ancestors 'none'")
    expect(csp).toMatch(/script-src 'self' 'sha256-[A-Za-z0-9+/=]+'/)
    expect(csp).not.toMatch(/unsafe-eval|script-src[^;]*unsafe-inline/)
    expect(r.headers.get('x-powered-by')).toBeNull()
    // RFC 6797 §6.1: max-age is required; one year is common practice.
    expect(r.headers.get('strict-transport-security')).toBe('max-age=31536000; includeSubDomains')
  })

  it('lets nothing run in or frame a JSON answer', async () => {
    const r = await app.fetch('/api/health')
    expect(r.headers.get('content-security-policy')).toBe("default-src 'none'; media-src 'self'; frame-ancestors 'none'")
    expect(r.headers.get('x-powered-by')).toBeNull()
  })
})

describe('ids', () => {
  // Decision: an id is a positive whole number in plain decimal; anything else is 400.
  it.each(['%201', '0x10', '1e1', '01', '+1', '1.0', '0', '-1', '1%20'])('GET /api/takes/%s is 400', async (id) => {
    const cookie = await app.login(pick('director'))
    const r = await app.fetch(`/api/takes/${id}`, { cookie })
    expect(r.status).toBe(400)
    expect((await r.json() as { data: { code: string } }).data.code).toBe('invalid_input')
  })

  it('still finds a take by its plain id, and refuses the same id padded on the audio route', async () => {
    const cookie = await app.login(pick('director'))
    const id = (await (await app.fetch('/api/takes?pageSize=1', { cookie })).json() as { items: { id: number }[] }).items[0]!.id
    expect((await app.fetch(`/api/takes/${id}`, { cookie })).status).toBe(200)
    expect((await app.fetch(`/takes/0${id}/audio`, { cookie })).status).toBe(400)
  })
})

describe('take audio', () => {
  let cookie: string
  let id: number
  let size: number
  beforeAll(async () => {
    cookie = await app.login(pick('director'))
    const t = (await (await app.fetch('/api/takes?pageSize=1', { cookie })).json() as { items: { id: number }[] }).items[0]!
    id = t.id
    size = dbQuery<{ bytes: number }>(app, 'select bytes from takes where id = ?', id)[0]!.bytes
  })

  // RFC 9110 §14.1.2: "bytes=0-0" is the first byte only; §15.3.7: 206 with Content-Range.
  it('answers Range: bytes=0-0 with one byte', async () => {
    const r = await app.fetch(`/takes/${id}/audio`, { cookie, headers: { range: 'bytes=0-0' } })
    expect(r.status).toBe(206)
    expect(r.headers.get('content-range')).toBe(`bytes 0-0/${size}`)
    expect(r.headers.get('content-length')).toBe('1')
    const body = new Uint8Array(await r.arrayBuffer())
    expect([...body]).toEqual([0x52]) // "R" of "RIFF", the first byte of a WAV file (common practice)
  })

  it('answers other ranges exactly', async () => {
    const r = await app.fetch(`/takes/${id}/audio`, { cookie, headers: { range: 'bytes=8-11' } })
    expect(r.status).toBe(206)
    expect(new TextDecoder().decode(await r.arrayBuffer())).toBe('WAVE') // bytes 8–11 of a WAV file
    const last = await app.fetch(`/takes/${id}/audio`, { cookie, headers: { range: 'bytes=-1' } })
    expect(last.headers.get('content-range')).toBe(`bytes ${size - 1}-${size - 1}/${size}`)
    expect((await last.arrayBuffer()).byteLength).toBe(1)
  })

  // RFC 9110 §9.3.2: HEAD answers the headers GET would, without content.
  it('answers HEAD with the GET headers and no body', async () => {
    const r = await app.fetch(`/takes/${id}/audio`, { method: 'HEAD', cookie })
    expect(r.status).toBe(200)
    expect(r.headers.get('content-length')).toBe(String(size))
    expect(r.headers.get('accept-ranges')).toBe('bytes')
    expect(r.headers.get('content-type')).toMatch(/^audio\//)
    expect((await r.arrayBuffer()).byteLength).toBe(0)
    const ranged = await app.fetch(`/takes/${id}/audio`, { method: 'HEAD', cookie, headers: { range: 'bytes=0-0' } })
    expect(ranged.status).toBe(206)
    expect(ranged.headers.get('content-length')).toBe('1')
    expect((await app.fetch(`/takes/${id}/audio`, { method: 'HEAD' })).status).toBe(404)
  })
})

describe('importers and uploads speak plainly', () => {
  let cookie: string
  let ensemble: number
  beforeAll(async () => {
    cookie = await app.login(pick('director'))
    ensemble = await ensembleId(app, cookie, /choir/i)
  })

  async function importFile (bytes: Uint8Array | string, name: string, title?: string) {
    const form = new FormData()
    form.append('file', new Blob([typeof bytes === 'string' ? bytes : new Uint8Array(bytes)]), name)
    if (title !== undefined) form.append('title', title)
    const r = await app.fetch(`/api/ensembles/${ensemble}/drills/import`, { method: 'POST', body: form, cookie })
    return { status: r.status, body: await r.json() as { message: string, data: { code: string, message?: string, issues?: { message: string }[] } } }
  }

  it.each([
    // "MThd", length 6, format 1, two tracks, 480 ticks per quarter note (Standard MIDI File 1.0), then nothing / noise.
    ['a MIDI header without its tracks', new Uint8Array([0x4d, 0x54, 0x68, 0x64, 0, 0, 0, 6, 0, 1, 0, 2, 1, 0xe0]), 'midi_unreadable'],
    ['a MIDI header followed by noise', new Uint8Array([0x4d, 0x54, 0x68, 0x64, 0, 0, 0, 6, 0, 1, 0, 2, 1, 0xe0, 1, 2, 3, 4, 5, 6, 7, 8, 9]), 'midi_unreadable'],
    ['broken JSON', '{\n  "title": "Warm-up",\n  "parts": [', 'invalid_json'],
    ['a note given as an object', JSON.stringify({ ...triadDrill(), chords: [{ beats: 2, notes: { Soprano: { pitch: 'A4' } } }] }), 'invalid_drill'],
    ['a list instead of a drill', '[1, 2, 3]', 'not_a_drill'],
  ])('%s', async (_, bytes, code) => {
    const r = await importFile(bytes, 'drill.mid')
    expect(r.status).toBe(code === 'not_a_drill' ? 415 : 400)
    expect(r.body.data.code).toBe(code)
    const words = [r.body.message, r.body.data.message ?? '', ...(r.body.data.issues ?? []).map(i => i.message)]
    for (const w of words) expect(w).not.toMatch(INTERNAL)
  })

  it('places broken JSON by line and column', async () => {
    const r = await importFile('{\n  "title": "Warm-up",\n  "parts": [', 'drill.json')
    expect(r.body.data.message).toBe('The drill file is not valid JSON (line 3, column 13)')
  })

  it('drops bidirectional controls from a drill title, part names and an upload\'s file name', async () => {
    const base = triadDrill('Tuning \u202Eseton\u202C')
    const doc = { ...base, parts: [{ name: 'Sop\u2067rano\u2069', instrument: 'voice-soprano' }], chords: base.chords.map(c => ({ ...c, notes: { 'Sop\u2067rano\u2069': c.notes.Soprano } })) }
    const drillId = await importDrill(app, cookie, ensemble, doc)
    const drill = await (await app.fetch(`/api/drills/${drillId}`, { cookie })).json() as { document: { title: string, parts: { name: string }[] } }
    expect(drill.document.title).toBe('Tuning seton')
    expect(drill.document.parts[0]!.name).toBe('Soprano')
    const titled = await importFile(JSON.stringify(triadDrill()), 'x.json', 'Evening \u2066warm-up\u2069')
    expect(titled.status).toBe(201)
    const again = await (await app.fetch(`/api/drills/${(titled.body as unknown as { id: number }).id}`, { cookie })).json() as { document: { title: string } }
    expect(again.document.title).toBe('Evening warm-up')

    const { wav } = triadTake([0, 0, 0])
    const singer = await app.login(accounts.find(a => a.role === 'player' && /choir/i.test(a.ensemble))!.email)
    const sent = await postTake(app, singer, { drillId, part: 'Soprano', audio: wav, name: 'take-\u202Egnp.wav' })
    expect(sent.status).toBe(202)
    const stored = dbQuery<{ original_name: string }>(app, 'select original_name from takes where id = ?', sent.body.id)[0]!
    expect(stored.original_name).toBe('take-gnp.wav')
  })
})

describe('sign-in failures are counted per account and client address', () => {
  it('locks one address out of one account without locking the owner out', async () => {
    const email = pick('player', 3)
    // 127.0.0.2 is another loopback address (RFC 5735: all of 127.0.0.0/8 is loopback), so the
    // server sees a second client.
    for (let i = 0; i < 5; i++) {
      expect((await loginFrom(app.url, '127.0.0.2', email, `guess-${i}`)).status).toBe(401)
    }
    expect((await loginFrom(app.url, '127.0.0.2', email, demoPassword())).status).toBe(429)
    expect((await loginFrom(app.url, '127.0.0.1', email, demoPassword())).status).toBe(200)
  })
})

describe('development services beside real ones', () => {
  let external: EmbeddedS3
  let dir: string
  let keys: { accessKeyId: string, secretAccessKey: string }
  beforeAll(async () => {
    dir = mkdtempSync(join(tmpdir(), 'driftline-external-store-'))
    keys = embeddedCredentials(join(dir, 'objects'))
    external = await startEmbeddedS3({ dir: join(dir, 'objects'), bucket: 'driftline', credentials: keys })
  })
  afterAll(async () => { await external?.close(); rmSync(dir, { recursive: true, force: true }) })

  const realStore = () => ({
    NUXT_STORAGE_ENDPOINT: external.endpoint,
    NUXT_STORAGE_ACCESS_KEY_ID: keys.accessKeyId,
    NUXT_STORAGE_SECRET_ACCESS_KEY: keys.secretAccessKey,
  })

  it('seeds no demo and shows no mailbox once a real object store is set', async () => {
    // The harness turns the demo seed on outright; 'auto' is the shipped default.
    const prod = await startApp({ env: { ...realStore(), NUXT_SEED_DEMO: 'auto' } })
    try {
      expect((await prod.fetch('/api/health')).status).toBe(200)
      expect((await prod.fetch('/api/auth/login', json({ email: pick('director'), password: demoPassword() }))).status).toBe(401)
      expect(prod.output()).toMatch(/demo scenario off/)
      expect(prod.output()).not.toMatch(/embedded mail catcher on/)
      const page = await (await prod.fetch('/forgot-password')).text()
      expect(page).toMatch(/devMailbox:false/)
      expect(page).not.toMatch(/\/dev\/mailbox/)
    } finally { await prod.stop() }
  })

  it('seeds the demo and runs the mailbox when both are turned on explicitly', async () => {
    const prod = await startApp({ env: { ...realStore(), NUXT_SEED_DEMO: 'true', NUXT_MAIL_EMBEDDED: 'true' } })
    try {
      const cookie = await prod.login(accounts.find(a => a.role === 'site admin')!.email)
      expect((await prod.fetch('/api/dev/mail', { cookie })).status).toBe(200)
    } finally { await prod.stop() }
  })

  it('keeps both on a fresh machine', async () => {
    const admin = await app.login(accounts.find(a => a.role === 'site admin')!.email)
    expect((await app.fetch('/api/dev/mail', { cookie: admin })).status).toBe(200)
    expect(await (await app.fetch('/forgot-password')).text()).toMatch(/devMailbox:true/)
  })
})

/** A POST with exactly the given headers (fetch would add a content type of its own). */
function postRaw (base: string, path: string, body: string, headers: Record<string, string>): Promise<{ status: number, body: string }> {
  return new Promise((resolve, reject) => {
    const req = httpRequest(base + path, { method: 'POST', headers: { ...headers, 'content-length': Buffer.byteLength(body) } }, (res) => {
      let text = ''
      res.setEncoding('utf8')
      res.on('data', (d) => { text += d })
      res.on('end', () => resolve({ status: res.statusCode ?? 0, body: text }))
    })
    req.on('error', reject)
    req.end(body)
  })
}

/** Signs in from a chosen local address. */
function loginFrom (base: string, localAddress: string, email: string, password: string): Promise<{ status: number }> {
  const body = JSON.stringify({ email, password })
  return new Promise((resolve, reject) => {
    const req = httpRequest(`${base}/api/auth/login`, { method: 'POST', localAddress, headers: { 'content-type': 'application/json', 'content-length': Buffer.byteLength(body) } }, (res) => {
      res.resume()
      res.on('end', () => resolve({ status: res.statusCode ?? 0 }))
    })
    req.on('error', reject)
    req.end(body)
  })
}
