// Forgot password → the mail in the development mailbox → a new password → signing in with it,
// all through the pages in Chromium.
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, Page } from 'playwright-core'
import { appReady, demoAccounts, demoPassword, launchBrowser, startApp, type App } from './harness'

let app: App
let browser: Browser
let admin: string
let player: string

beforeAll(async () => {
  const accounts = demoAccounts()
  const a = accounts.find(x => /admin/i.test(x.role))
  const p = accounts.find(x => /player/i.test(x.role))
  if (!a || !p) throw new Error('README.md lists no demo site admin or player')
  admin = a.email
  player = p.email
  app = await startApp()
  browser = await launchBrowser()
})

afterAll(async () => {
  await browser?.close()
  await app?.stop()
})

async function signIn(page: Page, email: string, password: string) {
  await page.goto(`${app.url}/login`)
  await appReady(page)
  await page.getByLabel('E-mail').fill(email)
  await page.getByLabel('Password').fill(password)
  await page.getByRole('button', { name: 'Sign in' }).click()
}

describe('password reset through the pages', () => {
  it('asks for a link, reads it in the mailbox, sets a new password and signs in with it', async () => {
    const context = await browser.newContext({ viewport: { width: 1280, height: 900 } })
    const page = await context.newPage()

    await page.goto(`${app.url}/login`)
    await appReady(page)
    await page.getByRole('link', { name: 'Forgot password?' }).click()
    await page.waitForURL(/\/forgot-password/)
    await page.getByLabel('E-mail').fill(player)
    await page.getByRole('button', { name: 'Send the link' }).click()
    // (The route announcer is a status region too; pick ours by its title.)
    const status = page.getByRole('status').filter({ hasText: 'Check your inbox' })
    await status.waitFor()
    expect(await status.textContent()).toContain('If the address has an account, a link is on its way')

    // The site admin sees every caught message in the development mailbox.
    await signIn(page, admin, demoPassword())
    await page.waitForURL(`${app.url}/`)
    let link = ''
    for (let i = 0; i < 20 && !link; i++) {
      await page.goto(`${app.url}/dev/mailbox`)
      const item = page.getByRole('navigation', { name: 'Messages' }).getByRole('link').filter({ hasText: player })
      if (await item.count()) {
        await item.first().click()
        const a = page.locator('article pre a').first()
        await a.waitFor()
        link = (await a.getAttribute('href')) ?? ''
      } else {
        await page.waitForTimeout(500)
      }
    }
    expect(link).toMatch(/\/reset-password\?token=/)
    await page.getByRole('button', { name: 'Sign out' }).click()
    await page.waitForURL(/\/login/)

    // The link names the configured base address; open its path on this server.
    const url = new URL(link)
    await page.goto(`${app.url}${url.pathname}${url.search}`)
    await page.getByLabel('New password', { exact: true }).fill('short')
    await page.getByLabel('New password again').fill('short')
    await page.getByRole('button', { name: 'Save the new password' }).click()
    expect(await page.getByText('Use at least 8 characters').isVisible()).toBe(true)

    await page.getByLabel('New password', { exact: true }).fill('a fresh tenor line')
    await page.getByLabel('New password again').fill('a fresh tenor line!')
    await page.getByRole('button', { name: 'Save the new password' }).click()
    expect(await page.getByText('The two passwords differ').isVisible()).toBe(true)

    await page.getByLabel('New password again').fill('a fresh tenor line')
    await page.getByRole('button', { name: 'Save the new password' }).click()
    await page.getByText('Password changed').waitFor()

    // The old password no longer works; the new one does.
    await signIn(page, player, demoPassword())
    await page.getByRole('alert').waitFor()
    await signIn(page, player, 'a fresh tenor line')
    await page.waitForURL(`${app.url}/`)
    await page.getByTestId('home-greeting').waitFor()

    // The link works once.
    await page.getByRole('button', { name: 'Sign out' }).click()
    await page.waitForURL(/\/login/)
    await page.goto(`${app.url}${url.pathname}${url.search}`)
    await page.getByLabel('New password', { exact: true }).fill('another good one')
    await page.getByLabel('New password again').fill('another good one')
    await page.getByRole('button', { name: 'Save the new password' }).click()
    const alert = page.getByRole('alert')
    await alert.waitFor()
    expect(await alert.textContent()).toContain('expired or was already used')
    await context.close()
  })

  it('a missing token says the link is incomplete', async () => {
    const page = await browser.newPage()
    await page.goto(`${app.url}/reset-password`)
    expect(await page.getByRole('alert').textContent()).toContain('This link is incomplete')
    await page.close()
  })
})
