// Every file under server/api, called without a session: 401, except the public routes.
import { readdirSync } from 'node:fs'
import { join, relative, sep } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { ROOT, startApp, type App } from './harness'

const API = join(ROOT, 'server/api')
const METHODS = ['get', 'post', 'put', 'patch', 'delete'] as const

/** Routes anyone may call (health, sign-in, password reset, invitation acceptance). */
const PUBLIC = [
  /^GET \/api\/health$/,
  /^POST \/api\/auth\/login$/,
  /^POST \/api\/auth\/password-reset(\/confirm)?$/,
  /^(GET|POST) \/api\/invitations\/[^/]+(\/accept)?$/,
]

function walk (dir: string): string[] {
  return readdirSync(dir, { withFileTypes: true }).flatMap(e => e.isDirectory() ? walk(join(dir, e.name)) : [join(dir, e.name)])
}

/** File name → method and path: `takes/[id].get.ts` → GET /api/takes/1. */
function route (file: string): { method: string, path: string } {
  let rel = relative(API, file).split(sep).join('/').replace(/\.(ts|js|mjs)$/, '')
  let method = 'GET'
  const m = new RegExp(`\\.(${METHODS.join('|')})$`).exec(rel)
  if (m) {
    method = m[1]!.toUpperCase()
    rel = rel.slice(0, -m[0].length)
  }
  const path = rel.split('/').map(s => s.replace(/^\[\.\.\..+\]$/, '1').replace(/\[[^\]]+\]/g, '1')).filter(s => s !== 'index').join('/')
  return { method, path: `/api/${path}`.replace(/\/$/, '') }
}

const routes = walk(API).filter(f => /\.(ts|js|mjs)$/.test(f) && !f.endsWith('.d.ts')).map(route)

let app: App
beforeAll(async () => { app = await startApp({ seed: false }) })
afterAll(async () => { await app?.stop() })

describe('anonymous requests to every API route', () => {
  it('finds the route files', () => {
    expect(routes.length).toBeGreaterThanOrEqual(10)
    expect(routes).toContainEqual({ method: 'GET', path: '/api/ensembles' })
    expect(routes).toContainEqual({ method: 'GET', path: '/api/dev/mail/1' })
  })

  it.each(routes.map(r => [`${r.method} ${r.path}`, r] as const))('%s', async (label, r) => {
    const init: RequestInit = { method: r.method }
    if (r.method !== 'GET') {
      init.headers = { 'content-type': 'application/json' }
      init.body = '{}'
    }
    const res = await app.fetch(r.path, init)
    if (PUBLIC.some(p => p.test(label))) {
      expect(res.status, `${label} is public`).not.toBe(401)
      expect(res.status).toBeLessThan(500)
    } else {
      expect(res.status, `${label} without a session`).toBe(401)
    }
  })
})
