// The pages' content security policy in Chromium: the take report (waveform, pitch chart, audio)
// and the drill page run with it and log no violation, and no other site may frame a page.
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, Page } from 'playwright-core'
import { CHROMIUM, CHROMIUM_ARGS, demoAccounts, launchBrowser, startApp, type App } from './harness'
import { waitForTake } from './takes-helpers'

let app: App
let browser: Browser
let cookie: string
let takeId: number
let drillId: number

beforeAll(async () => {
  app = await startApp()
  browser = await launchBrowser()
  const director = demoAccounts().find(a => a.role === 'director')!.email
  cookie = await app.login(director)
  const takes = await (await app.fetch('/api/takes?pageSize=20', { cookie })).json() as { items: { id: number, drillId?: number }[] }
  // The first seeded take the analysis workers finish: its report has a waveform, chart and holds.
  for (const t of takes.items) {
    const done = await waitForTake(app, cookie, t.id, 120_000)
    if (done.status === 'analysed') { takeId = t.id; drillId = done.drillId ?? done.drill?.id; break }
  }
  if (!takeId) throw new Error('no seeded take was analysed')
})

afterAll(async () => {
  await browser?.close()
  await app?.stop()
})

/** A signed-in page at `width` px that records every policy violation and console message. */
async function openPage (width = 1280) {
  const context = await browser.newContext({ viewport: { width, height: 900 } })
  const [name, value] = cookie.split(';')[0]!.split('=') as [string, string]
  await context.addCookies([{ name, value, url: app.url }])
  const page = await context.newPage()
  page.setDefaultTimeout(60_000)
  page.setDefaultNavigationTimeout(90_000)
  const console: string[] = []
  page.on('console', m => console.push(`${m.type()}: ${m.text()}`))
  page.on('pageerror', e => console.push(`pageerror: ${e.message}`))
  await page.addInitScript(() => {
    const seen: string[] = []
    ;(window as unknown as { __violations: string[] }).__violations = seen
    document.addEventListener('securitypolicyviolation', e => seen.push(`${e.violatedDirective} ${e.blockedURI} ${e.sourceFile}:${e.lineNumber}:${e.columnNumber}`))
  })
  const violations = () => page.evaluate(() => [...(window as unknown as { __violations: string[] }).__violations])
  return { page, console, violations, close: () => context.close() }
}

/**
 * Proves the page hydrated (its start-up script ran under the policy): following an in-app link
 * changes the address without loading a new document, which only the running app can do.
 */
async function followsLinkInApp (page: Page, href: string) {
  await page.waitForLoadState('networkidle')
  await page.evaluate(() => { (window as unknown as { __samePage: boolean }).__samePage = true })
  await page.locator(`a[href="${href}"]:visible`).first().click()
  await page.waitForURL(app.url + href)
  expect(await page.evaluate(() => (window as unknown as { __samePage?: boolean }).__samePage)).toBe(true)
}

describe('content security policy in the browser', () => {
  it('lets the take report draw its waveform and chart and load its audio, with no violation', async () => {
    const { page, console, violations, close } = await openPage()
    try {
      const res = await page.goto(`${app.url}/takes/${takeId}`)
      const csp = res!.headers()['content-security-policy'] ?? ''
      expect(csp).toContain("frame-ancestors 'none'")
      expect(csp).not.toMatch(/script-src[^;]*'unsafe-inline'/)
      expect(res!.headers()['x-powered-by']).toBeUndefined()
      // chart.js draws on a canvas; wavesurfer draws canvases inside its shadow root.
      await page.waitForFunction(() => document.querySelectorAll('canvas').length > 0)
      await page.waitForFunction(() => [...document.querySelectorAll('*')].some(el => el.shadowRoot?.querySelector('canvas')))
      // The audio element or the waveform fetched the take's audio from our own origin.
      await page.waitForFunction(() => performance.getEntriesByType('resource').some(r => /\/takes\/\d+\/audio/.test(r.name)))
      await followsLinkInApp(page, '/takes')
      expect(await violations()).toEqual([])
      expect(console.filter(m => /Content Security Policy|Refused to/i.test(m))).toEqual([])
      expect(console.filter(m => m.startsWith('pageerror'))).toEqual([])
    } finally { await close() }
  })

  it('lets the drill page and the take form run, with no violation', async () => {
    const { page, console, violations, close } = await openPage(390)
    try {
      await page.goto(`${app.url}/drills/${drillId}`)
      await page.getByRole('heading', { level: 1 }).waitFor()
      await followsLinkInApp(page, '/drills')
      await page.goto(`${app.url}/takes/new?drillId=${drillId}`)
      await page.getByRole('heading', { level: 1 }).waitFor()
      expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBe(390)
      await followsLinkInApp(page, '/takes')
      expect(await violations()).toEqual([])
      expect(console.filter(m => /Content Security Policy|Refused to/i.test(m))).toEqual([])
    } finally { await close() }
  })

  it('lets the recorder take the microphone and play the recording back from a blob: address', { timeout: 240_000 }, async () => {
    // Chromium's fake microphone (a test tone) stands in for a singer.
    const { chromium } = await import('playwright-core')
    const withMic = await chromium.launch({ executablePath: CHROMIUM, headless: true, args: [...CHROMIUM_ARGS, '--use-fake-device-for-media-stream', '--use-fake-ui-for-media-stream'] })
    try {
      const singer = demoAccounts().find(a => a.role === 'player' && /choir/i.test(a.ensemble))!.email
      const singerCookie = await app.login(singer)
      const context = await withMic.newContext({ viewport: { width: 390, height: 900 } })
      await context.grantPermissions(['microphone'], { origin: app.url })
      const [name, value] = singerCookie.split(';')[0]!.split('=') as [string, string]
      await context.addCookies([{ name, value, url: app.url }])
      const page = await context.newPage()
      page.setDefaultTimeout(60_000)
      const console: string[] = []
      page.on('console', m => console.push(m.text()))
      await page.addInitScript(() => {
        const seen: string[] = []
        ;(window as unknown as { __violations: string[] }).__violations = seen
        document.addEventListener('securitypolicyviolation', e => seen.push(`${e.violatedDirective} ${e.blockedURI}`))
      })
      await page.goto(`${app.url}/takes/new?drillId=${drillId}`)
      const record = page.getByRole('radio', { name: 'Record here' })
      await page.locator('label', { has: record }).click()
      await page.getByRole('button', { name: /Use the microphone/ }).click()
      await page.getByRole('button', { name: 'Start recording' }).click()
      await page.getByText(/Recording \d/).waitFor()
      await page.waitForTimeout(1500)
      await page.getByRole('button', { name: 'Stop', exact: true }).first().click()
      const listen = page.getByTestId('listen-back')
      await listen.waitFor()
      expect(await listen.getAttribute('src')).toMatch(/^blob:/)
      // The recording loads in the audio element: media from blob: is allowed.
      await page.waitForFunction(() => ((document.querySelector('[data-testid="listen-back"]') as HTMLAudioElement | null)?.readyState ?? 0) >= 1)
      expect(await page.evaluate(() => [...(window as unknown as { __violations: string[] }).__violations])).toEqual([])
      expect(console.filter(m => /Content Security Policy|Refused to/i.test(m))).toEqual([])
    } finally { await withMic.close() }
  })

  it('cannot be framed by another page', async () => {
    const { page, close } = await openPage()
    try {
      const blocked: string[] = []
      page.on('console', m => { if (/frame-ancestors/.test(m.text())) blocked.push(m.text()) })
      await page.setContent(`<iframe src="${app.url}/login"></iframe>`)
      await expect.poll(() => blocked.length, { timeout: 30_000 }).toBeGreaterThan(0)
    } finally { await close() }
  })
})
