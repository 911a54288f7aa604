// Sign-in, sign-out, rate limits, body limits and password reset against the built app.
import { request as httpRequest } from 'node:http'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { demoAccounts, demoPassword, freePort, startApp, type App } from './harness'

const json = (body: unknown) => ({ method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify(body) })
const errorOf = async (r: Response) => {
  const b = await r.json() as { statusCode: number, statusMessage?: string, message?: string, data?: Record<string, unknown> }
  return { status: r.status, statusMessage: b.statusMessage, message: b.message, data: b.data }
}

let app: App
const accounts = demoAccounts()
const pick = (role: string, skip: string[] = []) => {
  const a = accounts.find(x => x.role === role && !skip.includes(x.email))
  if (!a) throw new Error(`README lists no demo ${role}`)
  return a.email
}

beforeAll(async () => { app = await startApp() })
afterAll(async () => { await app?.stop() })

describe('POST /api/auth/login', () => {
  it('signs a demo director in and returns the session user', async () => {
    const email = pick('director')
    const r = await app.fetch('/api/auth/login', json({ email, password: demoPassword() }))
    expect(r.status).toBe(200)
    const body = await r.json()
    expect(body.user).toMatchObject({ email, siteRole: null })
    expect(Number.isInteger(body.user.id)).toBe(true)
    expect(typeof body.user.name).toBe('string')
    const cookie = r.headers.getSetCookie().map(c => c.split(';')[0]).join('; ')
    expect(cookie).toMatch(/=/)
    expect(r.headers.getSetCookie().join(';')).toMatch(/HttpOnly/i)
    expect((await app.fetch('/api/home', { cookie })).status).toBe(200)
  })

  it('accepts the address in any case and with spaces around it', async () => {
    const email = pick('player')
    const r = await app.fetch('/api/auth/login', json({ email: `  ${email.toUpperCase()} `, password: demoPassword() }))
    expect(r.status).toBe(200)
  })

  it('answers a wrong password and an unknown address with the same 401', async () => {
    const wrong = await errorOf(await app.fetch('/api/auth/login', json({ email: pick('director'), password: 'not-the-password' })))
    const unknown = await errorOf(await app.fetch('/api/auth/login', json({ email: 'nobody-here@example.org', password: 'not-the-password' })))
    expect(wrong.status).toBe(401)
    expect(wrong.message).toBe('Wrong e-mail or password')
    expect(wrong.data).toEqual({ code: 'wrong_credentials' })
    expect(unknown).toEqual(wrong)
  })

  it('answers malformed JSON with 400 invalid_json', async () => {
    const r = await app.fetch('/api/auth/login', { method: 'POST', headers: { 'content-type': 'application/json' }, body: '{"email": "a@example.org", "password": ' })
    const e = await errorOf(r)
    expect(e.status).toBe(400)
    expect(e.data?.code).toBe('invalid_json')
  })

  it('answers missing or bad fields with 400 and the zod issues', async () => {
    const e = await errorOf(await app.fetch('/api/auth/login', json({ email: 'not an address' })))
    expect(e.status).toBe(400)
    expect(e.data?.code).toBe('invalid_input')
    const paths = (e.data?.issues as { path: string[] }[]).map(i => i.path.join('.'))
    expect(paths).toEqual(expect.arrayContaining(['email', 'password']))
    const empty = await errorOf(await app.fetch('/api/auth/login', { method: 'POST', headers: { 'content-type': 'application/json' } }))
    expect(empty.status).toBe(400)
  })

  it('answers a body over the limit with 413, with or without a length header', async () => {
    const big = 'x'.repeat(2 * 1024 * 1024)
    const sized = await postOversized(app.url, big, true)
    expect(sized.status).toBe(413)
    expect(JSON.parse(sized.body).data?.code).toBe('body_too_large')
    // Chunked transfer: no content-length, the limit is enforced while reading.
    const chunked = await postOversized(app.url, big, false)
    expect(chunked.status).toBe(413)
  })

  it('limits failed attempts per account: 429 with Retry-After, even with the right password', async () => {
    const email = pick('player', [pick('player')])
    for (let i = 0; i < 5; i++) {
      expect((await app.fetch('/api/auth/login', json({ email, password: `guess-${i}` }))).status).toBe(401)
    }
    const r = await app.fetch('/api/auth/login', json({ email, password: demoPassword() }))
    expect(r.status).toBe(429)
    expect(Number(r.headers.get('retry-after'))).toBeGreaterThan(0)
    expect((await errorOf(r)).data?.code).toBe('rate_limited')
    // Another account from the same address still signs in.
    expect((await app.fetch('/api/auth/login', json({ email: pick('section leader'), password: demoPassword() }))).status).toBe(200)
  })
})

describe('POST /api/auth/logout', () => {
  it('ends the session, and the old cookie is refused afterwards', async () => {
    const cookie = await app.login(pick('section leader'))
    expect((await app.fetch('/api/ensembles', { cookie })).status).toBe(200)
    const r = await app.fetch('/api/auth/logout', { method: 'POST', cookie })
    expect(r.status).toBe(200)
    expect(await r.json()).toEqual({ ok: true })
    expect((await app.fetch('/api/ensembles', { cookie })).status).toBe(401)
  })

  it('answers 401 without a session', async () => {
    expect((await app.fetch('/api/auth/logout', { method: 'POST' })).status).toBe(401)
  })
})

describe('password reset', () => {
  it('mails a link that sets a new password once, and ends older sessions', async () => {
    const email = accounts.filter(a => a.role === 'player').at(-1)!.email
    const oldSession = await app.login(email)
    const r = await app.fetch('/api/auth/password-reset', json({ email }))
    expect(r.status).toBe(202)
    expect(await r.json()).toEqual({ ok: true })

    const admin = await app.login(accounts.find(a => a.role === 'site admin')!.email)
    let message: { id: string, to: string, subject: string } | undefined
    for (let i = 0; i < 40 && !message; i++) {
      const list = await (await app.fetch('/api/dev/mail', { cookie: admin })).json() as { id: string, to: string, subject: string }[]
      message = list.find(m => m.to.includes(email))
      if (!message) await new Promise(res => setTimeout(res, 100))
    }
    expect(message).toBeDefined()
    const full = await (await app.fetch(`/api/dev/mail/${message!.id}`, { cookie: admin })).json() as { text: string, html: string }
    const token = decodeURIComponent(/reset-password\?token=([^\s"&<]+)/.exec(full.text)![1]!)
    expect(full.text).toContain(`${app.url}/reset-password?token=`)

    // The user sees their own mail; another account does not.
    const own = await (await app.fetch('/api/dev/mail', { cookie: oldSession })).json() as { id: string }[]
    expect(own.map(m => m.id)).toContain(message!.id)
    const other = await app.login(pick('director'))
    const seen = await (await app.fetch('/api/dev/mail', { cookie: other })).json() as { id: string }[]
    expect(seen.map(m => m.id)).not.toContain(message!.id)
    expect((await app.fetch(`/api/dev/mail/${message!.id}`, { cookie: other })).status).toBe(404)

    const tooShort = await app.fetch('/api/auth/password-reset/confirm', json({ token, password: 'short' }))
    expect(tooShort.status).toBe(400)
    const ok = await app.fetch('/api/auth/password-reset/confirm', json({ token, password: 'a-new-password-123' }))
    expect(ok.status).toBe(200)
    const again = await errorOf(await app.fetch('/api/auth/password-reset/confirm', json({ token, password: 'another-password-456' })))
    expect(again).toMatchObject({ status: 400, data: { code: 'invalid_token' } })

    expect((await app.fetch('/api/home', { cookie: oldSession })).status).toBe(401)
    expect((await app.fetch('/api/auth/login', json({ email, password: demoPassword() }))).status).toBe(401)
    await app.login(email, 'a-new-password-123')
  })

  it('answers 202 for an unknown address and mails nothing', async () => {
    const admin = await app.login(accounts.find(a => a.role === 'site admin')!.email)
    const before = (await (await app.fetch('/api/dev/mail', { cookie: admin })).json() as unknown[]).length
    const r = await app.fetch('/api/auth/password-reset', json({ email: 'nobody-at-all@example.org' }))
    expect(r.status).toBe(202)
    await new Promise(res => setTimeout(res, 300))
    const after = (await (await app.fetch('/api/dev/mail', { cookie: admin })).json() as unknown[]).length
    expect(after).toBe(before)
  })

  it('refuses a made-up token and a malformed body', async () => {
    expect((await errorOf(await app.fetch('/api/auth/password-reset/confirm', json({ token: 'made-up', password: 'long-enough-1' })))).data?.code).toBe('invalid_token')
    expect((await app.fetch('/api/auth/password-reset', json({ email: 42 }))).status).toBe(400)
  })
})

describe('per-address sign-in limit', () => {
  let small: App
  beforeAll(async () => {
    small = await startApp({ seed: false, env: { NUXT_LOGIN_MAX_FAILURES_PER_ADDRESS: '3', NUXT_STORAGE_EMBEDDED: 'false', NUXT_STORAGE_ENDPOINT: `http://127.0.0.1:${await freePort()}` } })
  })
  afterAll(async () => { await small?.stop() })

  it('answers 429 once one address has failed too often, whatever account it tries', async () => {
    for (let i = 0; i < 3; i++) {
      expect((await small.fetch('/api/auth/login', json({ email: `walker-${i}@example.org`, password: 'x' }))).status).toBe(401)
    }
    const r = await small.fetch('/api/auth/login', json({ email: 'someone-else@example.org', password: 'x' }))
    expect(r.status).toBe(429)
    expect(Number(r.headers.get('retry-after'))).toBeGreaterThan(0)
  })
})

describe('cross-site writes', () => {
  it('refuses a sign-in posted from another site, and accepts the app\'s own origin', async () => {
    const body = { email: 'nobody@example.org', password: 'x' }
    const other = await app.fetch('/api/auth/login', { ...json(body), headers: { 'content-type': 'application/json', origin: 'https://elsewhere.example.org' } })
    expect(other.status).toBe(403)
    expect((await errorOf(other)).data?.code).toBe('cross_site')
    const fetchMeta = await app.fetch('/api/auth/login', { ...json(body), headers: { 'content-type': 'application/json', 'sec-fetch-site': 'cross-site' } })
    expect(fetchMeta.status).toBe(403)
    const own = await app.fetch('/api/auth/login', { ...json(body), headers: { 'content-type': 'application/json', origin: app.url } })
    expect(own.status).toBe(401)
  })
})

/**
 * Posts an oversized JSON body with node:http. The server answers 413 and closes the connection
 * before the whole body is sent, so a write error after the answer (EPIPE, ECONNRESET) is expected.
 */
function postOversized (base: string, filler: string, withLength: boolean): Promise<{ status: number, body: string }> {
  const payload = Buffer.from(JSON.stringify({ email: 'a@example.org', password: filler }))
  return new Promise((resolve, reject) => {
    const headers: Record<string, string | number> = { 'content-type': 'application/json' }
    if (withLength) headers['content-length'] = payload.length
    const req = httpRequest(`${base}/api/auth/login`, { method: 'POST', headers }, (res) => {
      let body = ''
      res.setEncoding('utf8')
      res.on('data', (d) => { body += d })
      res.on('end', () => resolve({ status: res.statusCode ?? 0, body }))
      res.on('error', reject)
    })
    req.on('error', (e: NodeJS.ErrnoException) => {
      if (e.code !== 'EPIPE' && e.code !== 'ECONNRESET') reject(e)
    })
    for (let i = 0; i < payload.length; i += 64 * 1024) req.write(payload.subarray(i, i + 64 * 1024))
    req.end()
  })
}
