// The account API against the built app: the profile and a password change that ends every
// other session. Status codes follow HTTP semantics (RFC 9110 §15.5: 400, 401).
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { demoAccounts, demoPassword, startApp, type App } from './harness'

type Json = Record<string, any>
const accounts = demoAccounts()
const players = accounts.filter(a => a.role === 'player').map(a => a.email)
const send = (method: string, body: unknown, cookie: string) => ({ method, headers: { 'content-type': 'application/json' }, body: JSON.stringify(body), cookie })

let app: App
beforeAll(async () => { app = await startApp() })
afterAll(async () => { await app?.stop() })

describe('profile', () => {
  it('reads and saves name, default instrument and concert or written pitch', async () => {
    const email = players[0]!
    const cookie = await app.login(email)
    const me = await (await app.fetch('/api/account', { cookie })).json() as Json
    expect(me).toMatchObject({ email, pitchView: 'concert', instrument: null, siteAdmin: false })
    expect(Object.keys(me).sort()).toEqual(['email', 'id', 'instrument', 'name', 'pitchView', 'siteAdmin'])

    // A B♭ cornet reads a major second above concert pitch (common practice); the engine's list names it.
    const r = await app.fetch('/api/account', send('PATCH', { name: '  Renamed Player ', instrument: 'cornet-bb', pitchView: 'written' }, cookie))
    expect(r.status).toBe(200)
    expect(await r.json()).toMatchObject({ name: 'Renamed Player', instrument: 'cornet-bb', pitchView: 'written' })
    const again = await (await app.fetch('/api/account', { cookie: cookieAfter(r, cookie) })).json() as Json
    expect(again).toMatchObject({ name: 'Renamed Player', instrument: 'cornet-bb', pitchView: 'written' })
    const home = await (await app.fetch('/api/home', { cookie: cookieAfter(r, cookie) })).json() as Json
    expect(home.user.name).toBe('Renamed Player')

    const cleared = await app.fetch('/api/account', send('PATCH', { instrument: null }, cookie))
    expect((await cleared.json() as Json).instrument).toBeNull()
  })

  it('refuses bad fields with 400 naming each, and changes nothing', async () => {
    const cookie = await app.login(players[1]!)
    const before = await (await app.fetch('/api/account', { cookie })).json()
    const cases: [unknown, string][] = [
      [{ name: '' }, 'name'],
      [{ name: '   ' }, 'name'],
      [{ name: 'x'.repeat(121) }, 'name'],
      [{ name: 'Tab\there' }, 'name'],
      [{ instrument: 'kazoo-in-h' }, 'instrument'],
      [{ pitchView: 'sounding' }, 'pitchView'],
      [{ email: 'other@example.org' }, ''],
      [{}, ''],
    ]
    for (const [body, field] of cases) {
      const r = await app.fetch('/api/account', send('PATCH', body, cookie))
      expect(r.status, JSON.stringify(body)).toBe(400)
      const e = await r.json() as Json
      expect(e.data.code).toBe('invalid_input')
      if (field) expect(e.data.issues.map((i: Json) => i.path[0])).toContain(field)
      expect(JSON.stringify(e)).not.toMatch(/undefined|\[object Object\]/)
    }
    expect(await (await app.fetch('/api/account', { cookie })).json()).toEqual(before)
    expect((await app.fetch('/api/account')).status).toBe(401)
  })
})

describe('password change', () => {
  it('needs the current password, keeps this session and ends every other one', async () => {
    const email = players[2]!
    const here = await app.login(email)
    const elsewhere = await app.login(email)

    const wrong = await app.fetch('/api/account/password', send('POST', { currentPassword: 'not-it', newPassword: 'a-fresh-password-1' }, here))
    expect(wrong.status).toBe(400)
    const we = await wrong.json() as Json
    expect(we.data.code).toBe('wrong_password')
    expect(we.data.issues[0].path).toEqual(['currentPassword'])
    const short = await app.fetch('/api/account/password', send('POST', { currentPassword: demoPassword(), newPassword: 'short' }, here))
    expect((await short.json() as Json).data.issues[0].path).toEqual(['newPassword'])
    const same = await app.fetch('/api/account/password', send('POST', { currentPassword: demoPassword(), newPassword: demoPassword() }, here))
    expect((await same.json() as Json).data.code).toBe('same_password')
    // Nothing changed yet: both sessions still work.
    expect((await app.fetch('/api/home', { cookie: elsewhere })).status).toBe(200)

    const ok = await app.fetch('/api/account/password', send('POST', { currentPassword: demoPassword(), newPassword: 'a-fresh-password-1' }, here))
    expect(ok.status).toBe(200)
    expect((await app.fetch('/api/home', { cookie: cookieAfter(ok, here) })).status).toBe(200)
    expect((await app.fetch('/api/home', { cookie: elsewhere })).status).toBe(401)
    await expect(app.login(email)).rejects.toThrow(/401/)
    await app.login(email, 'a-fresh-password-1')

    const admin = await app.login(accounts.find(a => a.role === 'site admin')!.email)
    const audit = await (await app.fetch('/api/admin/audit?action=account.password_changed', { cookie: admin })).json() as Json
    expect(audit.items[0]).toMatchObject({ action: 'account.password_changed', target: { type: 'user' } })
    expect(JSON.stringify(audit)).not.toContain('a-fresh-password-1')
  })
})

/** The cookie header after a response that may have replaced the session cookie. */
function cookieAfter (r: Response, previous: string): string {
  const set = r.headers.getSetCookie().map(c => c.split(';')[0]!)
  if (!set.length) return previous
  const jar = new Map(previous.split('; ').map(c => [c.split('=')[0]!, c] as const))
  for (const c of set) jar.set(c.split('=')[0]!, c)
  return [...jar.values()].join('; ')
}
