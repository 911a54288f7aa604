// The account page and the admin area in Chromium, on a 390-px phone screen (the page must be no
// wider than the screen) and with the keyboard, against the built app with the demo scenario.
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, Page } from 'playwright-core'
import { demoAccounts, demoPassword, launchBrowser, startApp, type App } from './harness'

let app: App
let browser: Browser
const accounts = demoAccounts()
const adminEmail = accounts.find(a => a.role === 'site admin')!.email
const players = accounts.filter(a => a.role === 'player')

beforeAll(async () => {
  app = await startApp()
  browser = await launchBrowser()
})
afterAll(async () => {
  await browser?.close()
  await app?.stop()
})

/** A phone-sized page signed in through the API (the sign-in form has its own browser test). */
async function signedIn (email: string, password = demoPassword(), width = 390, height = 844): Promise<Page> {
  const context = await browser.newContext({ viewport: { width, height } })
  const header = await app.login(email, password)
  await context.addCookies(header.split('; ').map((c) => {
    const i = c.indexOf('=')
    return { name: c.slice(0, i), value: c.slice(i + 1), url: app.url }
  }))
  return context.newPage()
}

/** Opens a page and waits until Vue has taken it over (before that a click submits natively). */
async function open (page: Page, path: string) {
  await page.goto(`${app.url}${path}`)
  await page.waitForFunction(() => Boolean((document.querySelector('#__nuxt') as { __vue_app__?: unknown } | null)?.__vue_app__))
}

/** The page is laid out no wider than the phone's screen (no sideways scrolling of the page). */
async function fitsScreen (page: Page) {
  const { scroll, view, wide } = await page.evaluate(() => {
    const view = window.innerWidth
    // What sticks out, for the failure message: elements past the right edge outside any scroll box.
    const clipped = (el: Element | null): boolean => {
      for (let p = el?.parentElement; p; p = p.parentElement) {
        if (['auto', 'scroll', 'hidden'].includes(getComputedStyle(p).overflowX)) return true
      }
      return false
    }
    const wide = [...document.querySelectorAll('body *')]
      .filter(el => el.getBoundingClientRect().right > view + 1 && !clipped(el))
      .slice(0, 3).map(el => el.outerHTML.slice(0, 160))
    return { scroll: document.documentElement.scrollWidth, view, wide }
  })
  expect(scroll, `wider than the screen: ${wide.join(' | ')}`).toBe(view)
}
const focusedLabel = (page: Page) => page.evaluate(() => {
  const el = document.activeElement as HTMLElement | null
  return el?.id ? document.querySelector(`label[for="${el.id}"]`)?.textContent?.trim() ?? el.textContent?.trim() : el?.textContent?.trim()
})

describe('account page', () => {
  it('saves the profile, and changes the password with a clear error first', async () => {
    const email = players[0]!.email
    const page = await signedIn(email)
    await open(page, '/account')
    await page.getByRole('heading', { name: 'Your account' }).waitFor()
    await fitsScreen(page)

    await page.getByLabel('Name', { exact: true }).fill('')
    await page.getByRole('button', { name: 'Save profile' }).click()
    await page.getByText('Enter your name').waitFor()
    expect(await focusedLabel(page)).toBe('Name')

    await page.getByLabel('Name', { exact: true }).fill('Phone Tester')
    await page.getByLabel('Default instrument or voice').selectOption('cornet-bb')
    await page.getByLabel('Written pitch (as printed for my instrument)').check()
    // A B♭ cornet reads a major second (2 semitones) above concert pitch (common practice).
    await page.getByText('Cornet in B♭ reads 2 semitones above concert pitch.').waitFor()
    await page.getByRole('button', { name: 'Save profile' }).click()
    await page.getByText('Profile saved.').waitFor()
    const me = await page.evaluate(() => fetch('/api/account').then(r => r.json()))
    expect(me).toMatchObject({ name: 'Phone Tester', instrument: 'cornet-bb', pitchView: 'written' })

    await page.getByLabel('Current password').fill('not-my-password')
    await page.getByLabel('New password', { exact: true }).fill('phone-password-1')
    await page.getByLabel('New password again').fill('phone-password-1')
    await page.getByRole('button', { name: 'Change password' }).click()
    await page.getByText('This is not your current password').waitFor()
    expect(await focusedLabel(page)).toBe('Current password')

    await page.getByLabel('Current password').fill(demoPassword())
    await page.getByRole('button', { name: 'Change password' }).click()
    await page.getByText('Password changed').waitFor()
    await fitsScreen(page)
    // Still signed in here after the change.
    expect(await page.evaluate(() => fetch('/api/home').then(r => r.status))).toBe(200)
    await page.context().close()
  })
})

describe('admin area', () => {
  it('is closed to anyone but a site admin', async () => {
    const page = await signedIn(accounts.find(a => a.role === 'director')!.email)
    await open(page, '/admin')
    await page.getByText('For site admins only').waitFor()
    expect(await page.getByRole('link', { name: 'Admin', exact: true }).count()).toBe(0)
    await page.context().close()
  })

  it('finds a user, disables them after a confirmation and restores them, on a phone', async () => {
    const target = players[1]!
    const page = await signedIn(adminEmail)
    await open(page, '/admin')
    await page.getByRole('heading', { name: 'Users' }).waitFor()
    await fitsScreen(page)
    await page.getByLabel('Name or e-mail').fill(target.email)
    const searched = page.waitForResponse(r => r.url().includes('/api/admin/users?') && r.url().includes('q='))
    await page.getByLabel('Name or e-mail').press('Enter')
    await page.waitForURL(/q=/)
    await searched
    const row = page.getByRole('row').filter({ hasText: target.email })
    await row.waitFor()
    expect(await page.getByRole('row').count()).toBe(2) // the header and the one match

    await row.getByRole('button', { name: /^Disable / }).click()
    const confirm = row.getByRole('button', { name: /^Disable .*\?$/ })
    await confirm.waitFor()
    expect(await confirm.evaluate(el => el === document.activeElement)).toBe(true)
    await page.keyboard.press('Enter')
    await page.getByText(/is disabled and signed out everywhere/).first().waitFor()
    await row.getByText('Disabled', { exact: true }).filter({ visible: true }).waitFor()
    await expect(app.login(target.email)).rejects.toThrow(/401/)

    await row.getByRole('button', { name: /^Restore / }).click()
    await page.getByText(/is restored/).first().waitFor()
    await app.login(target.email)
    await fitsScreen(page)
    await page.context().close()
  })

  it('creates an ensemble with its director invited, checking the form first', async () => {
    const page = await signedIn(adminEmail)
    await open(page, '/admin/ensembles')
    await page.getByRole('heading', { name: 'Ensembles', exact: true }).waitFor()
    await fitsScreen(page)

    await page.getByRole('button', { name: 'Create and invite' }).click()
    await page.getByText('Choose what kind of ensemble it is').waitFor()
    expect(await focusedLabel(page)).toBe('Name')

    const form = page.getByRole('form', { name: 'New ensemble' })
    await form.getByLabel('Name', { exact: true }).fill('Saltmarsh Chamber Choir')
    await form.getByLabel('Kind').selectOption('choir')
    await form.getByLabel('First director\'s e-mail').fill('not an address')
    await page.getByRole('button', { name: 'Create and invite' }).click()
    await page.getByText(/Enter an e-mail address/).waitFor()
    expect(await focusedLabel(page)).toBe('First director\'s e-mail')

    await page.getByLabel('First director\'s e-mail').fill('saltmarsh.director@example.org')
    await page.getByRole('button', { name: 'Create and invite' }).click()
    await page.getByText('Saltmarsh Chamber Choir created').waitFor()
    await page.getByRole('row').filter({ hasText: 'Saltmarsh Chamber Choir' }).getByText('invited: saltmarsh.director@example.org').waitFor()
    await fitsScreen(page)

    await page.getByRole('link', { name: 'Audit log' }).click()
    await page.getByRole('heading', { name: 'Audit log' }).waitFor()
    const filtered = page.waitForResponse(r => r.url().includes('/api/admin/audit?') && r.url().includes('action=ensemble'))
    await page.getByLabel('What').selectOption('ensemble')
    await page.waitForURL(/action=ensemble/)
    await filtered
    const created = page.getByRole('row').filter({ hasText: 'Created an ensemble' }).filter({ hasText: 'Saltmarsh Chamber Choir' })
    await created.waitFor()
    expect(await page.getByRole('row').filter({ hasText: 'Signed in' }).count()).toBe(0)
    await fitsScreen(page)
    await page.context().close()
  })
})
