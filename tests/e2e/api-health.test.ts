import { afterAll, describe, expect, it } from 'vitest'
import { freePort, startApp, type App } from './harness'

const apps: App[] = []
afterAll(async () => { await Promise.all(apps.map(a => a.stop())) })

describe('GET /api/health', () => {
  it('is 200 with every part ok on a fresh start (migrated and seeded)', async () => {
    const app = await startApp()
    apps.push(app)
    const r = await app.fetch('/api/health')
    expect(r.status).toBe(200)
    expect(await r.json()).toEqual({ status: 'ok', database: 'ok', storage: 'ok' })
    expect(app.output()).toMatch(/embedded object store on http:\/\/127\.0\.0\.1:\d+/)
    expect(app.output()).toMatch(/embedded mail catcher on 127\.0\.0\.1:\d+/)
  })

  it('serves the favicon and robots.txt from public/, without a session', async () => {
    const app = apps[0]!
    const robots = await app.fetch('/robots.txt')
    expect(robots.status).toBe(200)
    // Robots Exclusion Protocol (RFC 9309 §2.2): a group for every agent, the whole site disallowed.
    expect(await robots.text()).toMatch(/^User-agent: \*\s*\nDisallow: \/\s*$/m)
    const icon = await app.fetch('/favicon.svg')
    expect(icon.status).toBe(200)
    expect(icon.headers.get('content-type')).toMatch(/^image\/svg\+xml/)
    expect(await icon.text()).toContain('<svg')
    const html = await (await app.fetch('/login')).text()
    expect(html).toMatch(/<link[^>]+rel="icon"[^>]+href="\/favicon\.svg"/)
  })

  it('is 503 naming the object store when it is down', async () => {
    const closed = await freePort() // nothing listens there
    const app = await startApp({ seed: false, env: { NUXT_STORAGE_EMBEDDED: 'false', NUXT_STORAGE_ENDPOINT: `http://127.0.0.1:${closed}` } })
    apps.push(app)
    const r = await app.fetch('/api/health')
    expect(r.status).toBe(503)
    expect(await r.json()).toEqual({ status: 'degraded', database: 'ok', storage: 'down' })
  })
})
