// Starts the built app (.output) against a throwaway database, object store and mail folder,
// and a real Chromium for browser tests. Run `npm run build` first (`npm test` does).
import { spawn, type ChildProcess } from 'node:child_process'
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs'
import { createServer } from 'node:net'
import { tmpdir } from 'node:os'
import { join, resolve } from 'node:path'
import { randomBytes } from 'node:crypto'

export const ROOT = resolve(import.meta.dirname, '../..')
export const CHROMIUM = process.env.CHROMIUM_PATH || '/usr/bin/chromium'
export const CHROMIUM_ARGS = [
  '--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run',
  '--disable-background-networking', '--disable-component-update', '--disable-sync',
]

export interface App {
  url: string
  dir: string
  /** fetch relative to the app, with an optional session cookie. */
  fetch: (path: string, init?: RequestInit & { cookie?: string }) => Promise<Response>
  /** Signs in and returns the session cookie header value. */
  login: (email: string, password?: string) => Promise<string>
  /** Lines the server printed, for diagnosing a failure. */
  output: () => string
  stop: () => Promise<void>
}

/** A free TCP port on loopback. */
export function freePort(): Promise<number> {
  return new Promise((ok, fail) => {
    const srv = createServer()
    srv.once('error', fail)
    srv.listen(0, '127.0.0.1', () => {
      const port = (srv.address() as { port: number }).port
      srv.close(() => ok(port))
    })
  })
}

/** Demo password and accounts as the README lists them (scripts read them from there). */
export function demoPassword(): string {
  const m = readFileSync(join(ROOT, 'README.md'), 'utf8').match(/^Demo password: `([^`]+)`/m)
  if (!m) throw new Error('README.md has no "Demo password: `…`" line')
  return m[1]!
}

export function demoAccounts(): { email: string, role: string, ensemble: string }[] {
  const text = readFileSync(join(ROOT, 'README.md'), 'utf8')
  const rows = [...text.matchAll(/^\|\s*`?([^|`\s]+@example\.org)`?\s*\|\s*([^|]+?)\s*\|\s*([^|]+?)\s*\|/gm)]
  return rows.map(r => ({ email: r[1]!, role: r[2]!, ensemble: r[3]! }))
}

export async function startApp(opts: { seed?: boolean, env?: Record<string, string>, dir?: string } = {}): Promise<App> {
  const entry = join(ROOT, '.output/server/index.mjs')
  if (!existsSync(entry)) throw new Error('No built app: run `npm run build` first (npm test does it).')
  const dir = opts.dir ?? mkdtempSync(join(tmpdir(), 'driftline-e2e-'))
  const port = await freePort()
  const url = `http://127.0.0.1:${port}`
  const env: Record<string, string> = {
    ...process.env as Record<string, string>,
    NODE_ENV: 'production',
    PORT: String(port),
    HOST: '127.0.0.1',
    NITRO_HOST: '127.0.0.1',
    NUXT_DB_FILE: join(dir, 'driftline.sqlite'),
    NUXT_STORAGE_DIR: join(dir, 'objects'),
    NUXT_MAIL_DIR: join(dir, 'mail'),
    NUXT_SEED_DEMO: opts.seed === false ? 'false' : 'true',
    NUXT_SESSION_PASSWORD: randomBytes(24).toString('hex'),
    NUXT_BASE_URL: url,
    ...opts.env,
  }
  let log = ''
  const child: ChildProcess = spawn(process.execPath, [entry], { env, cwd: dir, stdio: ['ignore', 'pipe', 'pipe'] })
  child.stdout!.on('data', d => { log += d })
  child.stderr!.on('data', d => { log += d })
  let exited = false
  child.on('exit', () => { exited = true })

  const deadline = Date.now() + 90_000
  for (;;) {
    if (exited) throw new Error(`app exited during start:\n${log}`)
    try {
      const r = await fetch(`${url}/api/health`)
      if (r.status === 200 || r.status === 503) break
    } catch { /* not listening yet */ }
    if (Date.now() > deadline) { child.kill('SIGKILL'); throw new Error(`app did not start in 90 s:\n${log}`) }
    await new Promise(r => setTimeout(r, 250))
  }

  const app: App = {
    url,
    dir,
    output: () => log,
    fetch: (path, init = {}) => {
      const headers = new Headers(init.headers)
      if (init.cookie) headers.set('cookie', init.cookie)
      return fetch(url + path, { ...init, headers, redirect: 'manual' })
    },
    async login(email, password = demoPassword()) {
      const r = await app.fetch('/api/auth/login', {
        method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ email, password }),
      })
      if (r.status !== 200) throw new Error(`login ${email} → ${r.status} ${await r.text()}`)
      const cookies = r.headers.getSetCookie().map(c => c.split(';')[0]).join('; ')
      if (!cookies) throw new Error('login set no cookie')
      return cookies
    },
    async stop() {
      if (!exited) {
        const done = new Promise(r => child.once('exit', r))
        child.kill('SIGTERM')
        const t = setTimeout(() => child.kill('SIGKILL'), 5000)
        await done
        clearTimeout(t)
      }
      if (!opts.dir) rmSync(dir, { recursive: true, force: true })
    },
  }
  return app
}

/** Launches Debian's Chromium through playwright-core; fails loudly when it is missing. */
export async function launchBrowser() {
  if (!existsSync(CHROMIUM)) {
    throw new Error(`Chromium not found at ${CHROMIUM}. Install it with: apt-get update && apt-get install -y chromium`)
  }
  const { chromium } = await import('playwright-core')
  return chromium.launch({ executablePath: CHROMIUM, args: CHROMIUM_ARGS, headless: true })
}

/**
 * Waits until the app has hydrated the page (plugins/ready-mark.client.ts). Text typed before
 * then is overwritten by the app's own field values, which on a loaded machine loses input.
 */
export async function appReady(page: { waitForSelector: (s: string, o?: { state?: 'attached' }) => Promise<unknown> }): Promise<void> {
  await page.waitForSelector('html[data-app-ready]', { state: 'attached' })
}
