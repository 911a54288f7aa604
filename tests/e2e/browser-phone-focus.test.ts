// In Chromium against the built app with the seeded demo: the take report and the drill page fit
// a 390-px phone (the page is exactly as wide as the viewport, the score of every hold is on
// screen), the voicing grid's instructions are shown whole, an equal-temperament drill names its
// reference pitch once, focus moves to the error after a failed sign-in and to the new page's
// heading after a page change, and the sign-in pages hydrate without a mismatch.
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, ConsoleMessage, Page } from 'playwright-core'
import { appReady, demoAccounts, demoPassword, launchBrowser, startApp, type App } from './harness'

let app: App
let browser: Browser
let director: { email: string, cookie: string }
/** An analysed take the director may open, and its drill. */
let take: { id: number, drillId: number }

interface TakeList { items: { id: number, status: string, drill?: { id: number }, drillId?: number }[] }

beforeAll(async () => {
  const found = demoAccounts().find(a => /^director$/i.test(a.role) && /choir/i.test(a.ensemble))
  if (!found) throw new Error('README.md lists no choir director')
  app = await startApp()
  browser = await launchBrowser()
  director = { email: found.email, cookie: await app.login(found.email) }
  // The demo's takes are analysed by the server's workers after start-up: wait for one.
  const deadline = Date.now() + 150_000
  for (;;) {
    const r = await app.fetch('/api/takes?pageSize=50', { cookie: director.cookie })
    expect(r.status).toBe(200)
    const list = await r.json() as TakeList
    const t = list.items.find(x => x.status === 'analysed')
    if (t) {
      const detail = await (await app.fetch(`/api/takes/${t.id}`, { cookie: director.cookie })).json() as { drill: { id: number }, report: { holds: unknown[] } | null }
      if (detail.report && detail.report.holds.length >= 2) {
        take = { id: t.id, drillId: detail.drill.id }
        break
      }
    }
    if (Date.now() > deadline) throw new Error('no demo take was analysed within 150 s')
    await new Promise(r => setTimeout(r, 1000))
  }
}, 240_000)

afterAll(async () => {
  await browser?.close()
  await app?.stop()
})

async function newPage(width: number, height: number): Promise<Page> {
  const context = await browser.newContext({ viewport: { width, height } })
  const page = await context.newPage()
  page.setDefaultTimeout(60_000)
  page.setDefaultNavigationTimeout(90_000)
  return page
}

async function signIn(page: Page, password = demoPassword()) {
  await page.getByLabel('E-mail').fill(director.email)
  await page.getByLabel('Password').fill(password)
  await page.getByLabel('Password').press('Enter')
}

/** The page's layout width and the elements that stick out past the right edge of the viewport. */
function overflow(page: Page) {
  return page.evaluate(() => {
    const vw = document.documentElement.clientWidth
    const out: string[] = []
    for (const el of document.querySelectorAll<HTMLElement>('body *')) {
      const r = el.getBoundingClientRect()
      if (r.width === 0 || r.right <= vw + 0.5) continue
      // Inside a scroll box the overflow is the box's own business.
      let p = el.parentElement
      let clipped = false
      while (p && p !== document.body) {
        const ox = getComputedStyle(p).overflowX
        if ((ox === 'auto' || ox === 'scroll' || ox === 'hidden') && p.getBoundingClientRect().right <= vw + 0.5) { clipped = true; break }
        p = p.parentElement
      }
      if (!clipped) out.push(`${el.tagName.toLowerCase()}.${String(el.className).slice(0, 40)}`)
    }
    return { scrollWidth: document.documentElement.scrollWidth, escaped: out.slice(0, 5) }
  })
}

describe('on a 390-px phone', () => {
  it('the take report is as wide as the viewport and every hold shows its score on screen', async () => {
    const page = await newPage(390, 844)
    await page.goto(`${app.url}/login?redirect=/takes/${take.id}`)
    await appReady(page)
    await signIn(page)
    await page.waitForURL(`${app.url}/takes/${take.id}`)
    const cards = page.getByTestId('hold-cards')
    await cards.waitFor()
    const o = await overflow(page)
    expect(o.escaped).toEqual([])
    expect(o.scrollWidth).toBe(390)
    // The wide table is not shown on a phone; the cards are.
    expect(await page.getByTestId('hold-table').isVisible()).toBe(false)
    const holds = cards.locator(':scope > li')
    const n = await holds.count()
    expect(n).toBeGreaterThanOrEqual(2)
    for (let i = 0; i < n; i++) {
      const score = holds.nth(i).locator('[data-col="from-target"]')
      const box = (await score.boundingBox())!
      expect(box.x).toBeGreaterThanOrEqual(0)
      expect(box.x + box.width).toBeLessThanOrEqual(390)
      // A measured hold shows "From target" with a signed figure; other holds say why not.
      expect(await score.textContent()).toMatch(/From target\s*[+\u2212]?\d+\.\d ¢|Wrong note: heard|no pitch found/)
    }
    // On a tablet the full table shows; it scrolls inside its own box and the page stays as wide
    // as the viewport (its screen-reader-only text stays inside the box too).
    await page.setViewportSize({ width: 800, height: 1000 })
    await page.getByTestId('hold-table').waitFor()
    const wide = await overflow(page)
    expect(wide.escaped).toEqual([])
    expect(wide.scrollWidth).toBe(800)
    // From 1024 px the header shows every section's link in a row that wraps rather than overflows.
    await page.setViewportSize({ width: 1024, height: 1000 })
    await page.getByRole('navigation', { name: 'Main', exact: true }).waitFor()
    const desk = await overflow(page)
    expect(desk.escaped).toEqual([])
    expect(desk.scrollWidth).toBe(1024)
    await page.context().close()
  })

  it('the drill page is as wide as the viewport and the voicing grid\'s instructions are whole', async () => {
    const page = await newPage(390, 844)
    await page.goto(`${app.url}/login?redirect=/drills/${take.drillId}`)
    await appReady(page)
    await signIn(page)
    await page.waitForURL(`${app.url}/drills/${take.drillId}`)
    const help = page.getByTestId('voicing-grid-help')
    await help.waitFor()
    const o = await overflow(page)
    expect(o.escaped).toEqual([])
    expect(o.scrollWidth).toBe(390)
    // The instructions are not inside the grid's scroll box and are not cut off.
    const fits = await help.evaluate((el) => {
      const r = el.getBoundingClientRect()
      return r.left >= 0 && r.right <= document.documentElement.clientWidth && el.scrollWidth <= el.clientWidth
        && !el.closest('.overflow-x-auto')
    })
    expect(fits).toBe(true)
    expect(await help.textContent()).toContain('Arrow keys move')
    await page.context().close()
  })
})

describe('an equal-temperament drill', () => {
  it('names the reference pitch once under "Scored in"', async () => {
    const brass = demoAccounts().find(a => /^director$/i.test(a.role) && /brass/i.test(a.ensemble))
    if (!brass) throw new Error('README.md lists no brass director')
    const cookie = await app.login(brass.email)
    const ensembles = await (await app.fetch('/api/ensembles', { cookie })).json() as { id: number }[]
    let drillId: number | null = null
    for (const e of ensembles) {
      const drills = await (await app.fetch(`/api/ensembles/${e.id}/drills`, { cookie })).json() as { id: number, system: { name: string } }[]
      drillId ??= drills.find(d => d.system.name === 'equal')?.id ?? null
    }
    if (drillId === null) throw new Error('the demo has no equal-temperament drill')
    const page = await newPage(1280, 900)
    await page.goto(`${app.url}/login?redirect=/drills/${drillId}`)
    await appReady(page)
    await page.getByLabel('E-mail').fill(brass.email)
    await page.getByLabel('Password').fill(demoPassword())
    await page.getByLabel('Password').press('Enter')
    await page.waitForURL(`${app.url}/drills/${drillId}`)
    const scored = await page.getByTestId('scored-in').textContent()
    expect(scored).toMatch(/Equal temperament/)
    expect(scored!.match(/A4 = \d+(\.\d+)? Hz/g)).toHaveLength(1)
    await page.context().close()
  })
})

describe('focus', () => {
  it('moves to the error after a failed sign-in, then to the new page\'s heading after each page change', async () => {
    const page = await newPage(1280, 900)
    await page.goto(`${app.url}/login`)
    await appReady(page)
    await page.getByLabel('E-mail').waitFor()
    await signIn(page, 'not-the-password-at-all')
    const error = page.getByTestId('login-error')
    await error.waitFor()
    await page.waitForFunction(() => document.activeElement?.getAttribute('data-testid') === 'login-error')
    expect(await error.locator('[role="alert"]').textContent()).toMatch(/\S/)

    await page.getByLabel('Password').fill(demoPassword())
    await page.getByLabel('Password').press('Enter')
    await page.waitForURL(`${app.url}/`)
    await page.waitForFunction(() => document.activeElement?.tagName === 'H1' && /^\s*Welcome back/.test(document.activeElement.textContent ?? ''))
    // It stays there (no later render takes it away).
    await page.getByTestId('home-greeting').waitFor()
    await page.waitForLoadState('networkidle')
    expect(await page.evaluate(() => document.activeElement?.getAttribute('data-testid'))).toBe('home-greeting')

    await page.getByRole('navigation', { name: 'Main', exact: true }).getByRole('link', { name: 'Drills', exact: true }).click()
    await page.waitForURL(`${app.url}/drills`)
    await page.waitForFunction(() => document.activeElement?.tagName === 'H1' && !/Welcome back/.test(document.activeElement.textContent ?? ''))
    const heading = await page.evaluate(() => document.activeElement?.textContent?.trim())
    expect(heading).toBe(await page.locator('#main h1').first().textContent().then(t => t?.trim()))
    // The change is announced politely with the new page's title.
    const announcer = page.locator('.nuxt-route-announcer [aria-live="polite"]')
    await page.waitForFunction(() => /Drills/.test(document.querySelector('.nuxt-route-announcer [aria-live]')?.textContent ?? ''))
    expect(await announcer.count()).toBe(1)
    await page.context().close()
  })
})

describe('the sign-in pages', () => {
  it('hydrate without a mismatch on a phone and a desktop screen', async () => {
    const problems: string[] = []
    for (const [w, h] of [[390, 844], [1280, 900]] as const) {
      const page = await newPage(w, h)
      const note = (m: ConsoleMessage) => {
        if (/hydrat|mismatch/i.test(m.text())) problems.push(`${w}px ${page.url()}: ${m.text()}`)
      }
      page.on('console', note)
      for (const path of ['/login', '/login?redirect=/drills', '/forgot-password', '/reset-password?token=abc']) {
        await page.goto(`${app.url}${path}`, { waitUntil: 'networkidle' })
        await page.locator('h1').first().waitFor()
      }
      await page.context().close()
    }
    expect(problems).toEqual([])
  })
})
