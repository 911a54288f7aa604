// Sign-in, home page and sign-out through the real form in Chromium, against the built app with
// the seeded demo scenario.
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, Page } from 'playwright-core'
import { appReady, demoAccounts, demoPassword, launchBrowser, startApp, type App } from './harness'

let app: App
let browser: Browser
let director: { email: string, role: string, ensemble: string }

interface Home {
  user: { name: string }
  memberships: { ensembleName: string, role: string }[]
  ensembleSummary: { ensembleName: string }[]
}

beforeAll(async () => {
  const found = demoAccounts().find(a => /director/i.test(a.role))
  if (!found) throw new Error('README.md lists no demo director')
  director = found
  app = await startApp()
  browser = await launchBrowser()
})

afterAll(async () => {
  await browser?.close()
  await app?.stop()
})

async function newPage(width = 1280, height = 900): Promise<Page> {
  const context = await browser.newContext({ viewport: { width, height } })
  return context.newPage()
}

async function signIn(page: Page, email: string, password: string) {
  await page.getByLabel('E-mail').fill(email)
  await page.getByLabel('Password').fill(password)
  // Enter submits, as in any form.
  await page.getByLabel('Password').press('Enter')
}

/** What the server says the director's home holds, to compare the page against. */
async function directorHome(): Promise<Home> {
  const cookie = await app.login(director.email)
  const r = await app.fetch('/api/home', { cookie })
  expect(r.status).toBe(200)
  return await r.json() as Home
}

describe('signing in through the browser', () => {
  it('sends a signed-out visitor to the sign-in page', async () => {
    const page = await newPage()
    await page.goto(`${app.url}/`)
    await page.waitForURL(/\/login/)
    await expect(page.getByRole('heading', { name: 'Sign in' }).isVisible()).resolves.toBe(true)
    await page.context().close()
  })

  it('a demo director signs in and sees their home page with seeded data', async () => {
    const home = await directorHome()
    expect(home.memberships.some(m => m.role === 'director')).toBe(true)
    const page = await newPage()
    await page.goto(`${app.url}/login`)
    await appReady(page)
    await signIn(page, director.email, demoPassword())
    await page.waitForURL(`${app.url}/`)
    const greeting = page.getByTestId('home-greeting')
    await greeting.waitFor()
    expect(await greeting.textContent()).toContain(home.user.name)
    await page.getByRole('heading', { name: 'Your ensembles at a glance' }).waitFor()
    expect(await page.getByTestId('user-name').textContent()).toContain(home.user.name)
    // At least one of their ensembles is listed, and the director's summary shows it.
    const main = page.locator('main')
    const text = (await main.textContent()) ?? ''
    expect(home.memberships.some(m => text.includes(m.ensembleName))).toBe(true)
    expect(await page.getByRole('heading', { name: 'Your ensembles at a glance' }).isVisible()).toBe(true)
    expect(home.ensembleSummary.length).toBeGreaterThan(0)
    const summary = page.locator('section[aria-labelledby="home-summary"]')
    expect(await summary.getByRole('heading', { name: home.ensembleSummary[0]!.ensembleName }).isVisible()).toBe(true)
    // The navigation offers the pages that exist, with the current one marked.
    const nav = page.getByRole('navigation', { name: 'Main', exact: true })
    expect(await nav.getByRole('link', { name: 'Home' }).getAttribute('aria-current')).toBe('page')
    expect(await nav.getByRole('link', { name: 'Ensembles' }).isVisible()).toBe(true)
    await page.context().close()
  })

  it('a wrong password shows the server’s message in an alert and keeps the address', async () => {
    const r = await app.fetch('/api/auth/login', {
      method: 'POST', headers: { 'content-type': 'application/json' },
      body: JSON.stringify({ email: director.email, password: 'definitely not it' }),
    })
    expect(r.status).toBe(401)
    const body = await r.json() as { message?: string, statusMessage?: string }
    const serverText = body.message || body.statusMessage || ''
    expect(serverText).toMatch(/wrong e-mail or password/i)

    const page = await newPage()
    await page.goto(`${app.url}/login`)
    await appReady(page)
    await signIn(page, director.email, 'definitely not it')
    const alert = page.getByRole('alert')
    await alert.waitFor()
    expect((await alert.textContent())?.trim()).toBe(serverText)
    expect(page.url()).toContain('/login')
    expect(await page.getByLabel('E-mail').inputValue()).toBe(director.email)
    await page.context().close()
  })

  it('returns to the page the visitor wanted after signing in', async () => {
    const page = await newPage()
    await page.goto(`${app.url}/ensembles`)
    await page.waitForURL(/\/login\?redirect=/)
    await signIn(page, director.email, demoPassword())
    await page.waitForURL(`${app.url}/ensembles`)
    const table = page.getByRole('table')
    await table.waitFor()
    expect(await table.locator('caption').textContent()).toMatch(/role/i)
    expect(await table.getByRole('rowheader').count()).toBeGreaterThan(0)
    await page.context().close()
  })

  it('signing out returns to the sign-in page and ends the session', async () => {
    const page = await newPage()
    await page.goto(`${app.url}/login`)
    await appReady(page)
    await signIn(page, director.email, demoPassword())
    await page.waitForURL(`${app.url}/`)
    await page.getByRole('button', { name: 'Sign out' }).click()
    await page.waitForURL(/\/login/)
    expect(await page.getByRole('heading', { name: 'Sign in' }).isVisible()).toBe(true)
    const status = await page.evaluate(async () => (await fetch('/api/home')).status)
    expect(status).toBe(401)
    await page.goto(`${app.url}/`)
    await page.waitForURL(/\/login/)
    await page.context().close()
  })

  it('on a phone the navigation folds into a menu button', async () => {
    const page = await newPage(390, 844)
    await page.goto(`${app.url}/login`)
    await appReady(page)
    await signIn(page, director.email, demoPassword())
    await page.waitForURL(`${app.url}/`)
    const button = page.getByRole('button', { name: 'Menu' })
    expect(await button.getAttribute('aria-expanded')).toBe('false')
    expect(await page.getByRole('navigation', { name: 'Main', exact: true }).isVisible()).toBe(false)
    await button.click()
    expect(await button.getAttribute('aria-expanded')).toBe('true')
    const compact = page.getByRole('navigation', { name: 'Main (compact)' })
    await compact.getByRole('link', { name: 'Ensembles' }).click()
    await page.waitForURL(`${app.url}/ensembles`)
    expect(await button.getAttribute('aria-expanded')).toBe('false')
    await page.context().close()
  })

  it('keyboard users get a skip link first and land in the main content', async () => {
    const page = await newPage()
    await page.goto(`${app.url}/login`)
    await appReady(page)
    await signIn(page, director.email, demoPassword())
    await page.waitForURL(`${app.url}/`)
    await page.getByTestId('home-greeting').waitFor()
    // A fresh load of the page: the skip link is the first stop of the tab order.
    await page.goto(`${app.url}/`)
    await page.getByTestId('home-greeting').waitFor()
    await page.keyboard.press('Tab')
    const focused = page.locator(':focus')
    expect(await focused.textContent()).toBe('Skip to content')
    expect(await focused.isVisible()).toBe(true)
    await page.keyboard.press('Enter')
    expect(await page.evaluate(() => document.activeElement?.id)).toBe('main')
    await page.context().close()
  })
})

describe('typing before the app has started', () => {
  it('keeps what was typed into the server-rendered sign-in form and signs in with it', async () => {
    const page = await newPage(390, 844)
    // The app's scripts arrive late, as on a slow phone: the form is there, the app is not yet.
    await page.route('**/_nuxt/**/*.js', async (route) => {
      await new Promise(r => setTimeout(r, 1500))
      await route.continue()
    })
    await page.goto(`${app.url}/login`, { waitUntil: 'commit' })
    await page.getByLabel('E-mail').fill(director.email)
    await page.getByLabel('Password').fill(demoPassword())
    expect(await page.evaluate(() => document.documentElement.hasAttribute('data-app-ready'))).toBe(false)
    await appReady(page)
    expect(await page.getByLabel('E-mail').inputValue()).toBe(director.email)
    await page.getByRole('button', { name: 'Sign in' }).click()
    await page.waitForURL(`${app.url}/`)
    await page.context().close()
  })
})
