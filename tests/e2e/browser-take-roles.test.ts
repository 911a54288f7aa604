// Who reads a take, in Chromium on a 390-px phone screen: a director restores a withdrawn take
// from the list and reads a player's take in the player's name; the take form fits the screen.
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, Page } from 'playwright-core'
import { appReady, demoPassword, launchBrowser, startApp, type App } from './harness'
import { retryStaleSockets } from './takes-helpers'

const DIRECTOR = 'helena.marsh@example.org'
const PLAYER = 'clara.lindqvist@example.org'

let app: App
let browser: Browser
let director: string
let player: string

beforeAll(async () => {
  app = retryStaleSockets(await startApp({ env: { NUXT_ANALYSIS_WORKERS: '0' } }))
  browser = await launchBrowser()
  director = await app.login(DIRECTOR)
  player = await app.login(PLAYER)
})

afterAll(async () => {
  await browser?.close()
  await app?.stop()
})

async function phonePage(email: string): Promise<Page> {
  const context = await browser.newContext({ viewport: { width: 390, height: 844 }, isMobile: true, hasTouch: true })
  const page = await context.newPage()
  page.setDefaultTimeout(60_000)
  page.setDefaultNavigationTimeout(90_000)
  await page.goto(`${app.url}/login`)
  await appReady(page)
  await page.getByLabel('E-mail').fill(email)
  await page.getByLabel('Password').fill(demoPassword())
  await page.getByLabel('Password').press('Enter')
  await page.waitForURL(`${app.url}/`)
  return page
}

/** The page is laid out no wider than the screen (nothing scrolls sideways). */
async function expectFitsScreen(page: Page) {
  const width = await page.evaluate(() => document.documentElement.scrollWidth)
  expect(width).toBe(390)
}

describe('a director on a phone', () => {
  it('lists the withdrawn takes and restores one', { timeout: 240_000 }, async () => {
    const mine = await (await app.fetch('/api/takes?player=me', { cookie: player })).json() as any
    const take = mine.items.find((t: any) => !t.withdrawn)
    if (!take) throw new Error('the demo player has no take')
    expect((await app.fetch(`/api/takes/${take.id}/withdraw`, { method: 'POST', cookie: player })).status).toBe(200)

    const page = await phonePage(DIRECTOR)
    await page.goto(`${app.url}/takes?withdrawn=only`)
    await page.getByRole('heading', { level: 1, name: 'Withdrawn takes' }).waitFor()
    await expectFitsScreen(page)
    const restore = page.getByRole('button', { name: new RegExp(`^Restore .*${take.drillTitle}`) }).first()
    await restore.click()
    await page.getByTestId('restore-message').waitFor()
    expect(await page.getByTestId('restore-message').textContent()).toContain('Restored')
    // Focus lands on the heading, not on a button that has gone.
    await page.waitForFunction(() => document.activeElement?.tagName === 'H1')
    const after = await (await app.fetch(`/api/takes/${take.id}`, { cookie: director })).json() as any
    expect(after.withdrawnAt).toBeNull()
    await page.context().close()
  })

  it('reads a player\'s take in the player\'s name, with no offer to record it', { timeout: 240_000 }, async () => {
    const mine = await (await app.fetch('/api/takes?player=me', { cookie: player })).json() as any
    const take = mine.items[0]
    const page = await phonePage(DIRECTOR)
    await page.goto(`${app.url}/takes/${take.id}`)
    await page.getByRole('heading', { level: 1 }).waitFor()
    const text = (await page.locator('main').textContent()) ?? ''
    expect(text).not.toMatch(/\byour (first|previous) take\b/i)
    expect(text).not.toContain('Record another take')
    const detail = await (await app.fetch(`/api/takes/${take.id}`, { cookie: director })).json() as any
    if (detail.report) expect(text).toContain('Clara’s takes of this drill and part')
    await page.context().close()
  })
})

describe('a player on a phone', () => {
  it('gets the take form laid out within the screen', { timeout: 240_000 }, async () => {
    const home = await (await app.fetch('/api/home', { cookie: player })).json() as any
    const due = home.due.find((d: any) => d.part)
    if (!due) throw new Error('the demo player has no assignment')
    const page = await phonePage(PLAYER)
    await page.goto(`${app.url}/takes/new?drillId=${due.drillId}&part=${encodeURIComponent(due.part)}`)
    await page.getByRole('heading', { level: 1, name: 'Record or upload a take' }).waitFor()
    await page.getByLabel('Part').waitFor()
    await expectFitsScreen(page)
    await page.context().close()
  })
})
