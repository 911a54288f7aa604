// A director invites a singer; the message arrives in the development mailbox; the singer follows
// the link, sets a password and sees the ensemble; the director makes them section leader; the
// audit log holds both changes. Every new ensemble screen is also checked at phone width (390 px).
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, Page } from 'playwright-core'
import { appReady, demoAccounts, demoPassword, launchBrowser, startApp, type App } from './harness'

let app: App
let browser: Browser
const accounts = demoAccounts()
const admin = accounts.find(a => a.role === 'site admin')!.email
const director = accounts.find(a => a.role === 'director' && /Choir/.test(a.ensemble))!
const singer = { email: 'tide.singer@example.org', name: 'Tide Singer', password: 'salt spray and tenor lines' }

beforeAll(async () => {
  app = await startApp()
  browser = await launchBrowser()
})
afterAll(async () => {
  await browser?.close()
  await app?.stop()
})

async function signIn(page: Page, email: string, password = demoPassword()) {
  await page.goto(`${app.url}/login`)
  await appReady(page)
  await page.getByLabel('E-mail').fill(email)
  await page.getByLabel('Password').fill(password)
  await page.getByRole('button', { name: 'Sign in' }).click()
  await page.waitForURL(`${app.url}/`)
}

/** The page is no wider than the viewport (nothing scrolls sideways). */
async function fitsWidth(page: Page) {
  return page.evaluate(() => document.documentElement.scrollWidth <= window.innerWidth)
}

describe('inviting a singer through the pages', () => {
  it('invites, accepts, promotes, and the audit log shows both changes', async () => {
    const dirCtx = await browser.newContext({ viewport: { width: 1280, height: 900 } })
    const dir = await dirCtx.newPage()
    await signIn(dir, director.email)
    await dir.goto(`${app.url}/ensembles`)
    await dir.getByRole('link', { name: director.ensemble }).click()
    await dir.getByRole('heading', { level: 1, name: director.ensemble }).waitFor()
    const dirUrl = dir.url()
    await dir.getByRole('navigation', { name: 'Ensemble' }).getByRole('link', { name: 'Invitations' }).click()
    await dir.waitForURL(/\/invitations$/)

    // A bad address is refused beside the field before anything is sent.
    await dir.getByLabel('E-mail').fill('tide.singer.example.org')
    await dir.getByRole('button', { name: 'Send the invitation' }).click()
    expect(await dir.getByText('Enter an e-mail address such as name@example.org').isVisible()).toBe(true)

    await dir.getByLabel('E-mail').fill(singer.email)
    await dir.getByLabel('Section').selectOption({ label: 'Tenor' })
    await dir.getByRole('button', { name: 'Send the invitation' }).click()
    await dir.getByText(`Invitation sent to ${singer.email}.`).waitFor()
    await dir.getByText(singer.email, { exact: true }).first().waitFor() // in the open invitations

    // The message is in the development mailbox (the site admin sees every message).
    const adminCtx = await browser.newContext()
    const box = await adminCtx.newPage()
    await signIn(box, admin)
    let link = ''
    for (let i = 0; i < 20 && !link; i++) {
      await box.goto(`${app.url}/dev/mailbox`)
      const item = box.getByRole('navigation', { name: 'Messages' }).getByRole('link').filter({ hasText: singer.email })
      if (await item.count()) {
        await item.first().click()
        const a = box.locator('article pre a')
        await a.first().waitFor()
        expect(await a.count()).toBe(1)
        link = (await a.first().getAttribute('href')) ?? ''
      } else {
        await box.waitForTimeout(500)
      }
    }
    expect(link).toMatch(new RegExp(`^${app.url}/invitations/[A-Za-z0-9_-]+$`))
    await adminCtx.close()

    // The singer, signed out, follows the link on a phone, sets a password and lands in the ensemble.
    const singerCtx = await browser.newContext({ viewport: { width: 390, height: 844 } })
    const s = await singerCtx.newPage()
    await s.goto(link)
    await s.getByRole('heading', { name: `Join ${director.ensemble}` }).waitFor()
    expect(await s.getByText('in the Tenor section').isVisible()).toBe(true)
    expect(await fitsWidth(s)).toBe(true)
    await s.getByLabel('Your name').fill(singer.name)
    await s.getByLabel('Password', { exact: true }).fill('short')
    await s.getByLabel('Password again').fill('short')
    await s.getByRole('button', { name: 'Create the account and join' }).click()
    expect(await s.getByText('Use at least 8 characters').isVisible()).toBe(true)
    await s.getByLabel('Password', { exact: true }).fill(singer.password)
    await s.getByLabel('Password again').fill(singer.password)
    await s.getByRole('button', { name: 'Create the account and join' }).click()
    await s.waitForURL(/\/ensembles\/\d+$/)
    await s.getByRole('heading', { level: 1, name: director.ensemble }).waitFor()
    expect(await fitsWidth(s)).toBe(true)
    // A player sees names and sections but no addresses.
    await s.getByRole('navigation', { name: 'Ensemble' }).getByRole('link', { name: 'Members' }).click()
    await s.getByRole('table').waitFor()
    expect(await s.getByRole('table').textContent()).toContain(singer.name)
    expect(await s.getByRole('table').textContent()).not.toContain('@example.org')
    expect(await fitsWidth(s)).toBe(true)
    // The link works once.
    await s.goto(link)
    await s.getByText('This invitation can no longer be used').waitFor()
    await singerCtx.close()

    // The director makes the singer section leader.
    await dir.getByRole('navigation', { name: 'Ensemble' }).getByRole('link', { name: 'Members' }).click()
    await dir.getByLabel('Search').fill('Tide')
    const row = dir.getByRole('row').filter({ hasText: singer.name })
    await row.getByRole('button', { name: `Edit ${singer.name}` }).waitFor()
    await expect.poll(() => dir.getByRole('row').count(), { timeout: 10_000 }).toBe(2) // the header and the one match
    await row.getByRole('button', { name: `Edit ${singer.name}` }).click()
    const editor = dir.getByRole('form', { name: `Edit ${singer.name}` })
    await editor.getByLabel('Role').selectOption('section_leader')
    await editor.getByRole('button', { name: 'Save' }).click()
    await dir.getByRole('status').filter({ hasText: `Saved ${singer.name}: Section leader, Tenor.` }).waitFor({ state: 'attached' })
    // The status is announced before the table has reloaded: wait for the row to show the change.
    await expect.poll(() => row.textContent(), { timeout: 10_000 }).toContain('Section leader')
    await dirCtx.close()

    // The audit log, as the site admin reads it (GET /api/admin/audit): the invitation sent, the
    // invitation accepted (the membership created) and the role change, with before and after.
    const adminCookie = await app.login(admin)
    const ensembleId = Number(/\/ensembles\/(\d+)/.exec(dirUrl)![1])
    const idOf = async (email: string) => (await (await app.fetch(`/api/admin/users?q=${encodeURIComponent(email)}`, { cookie: adminCookie })).json()).items[0].id as number
    const [directorId, singerId] = [await idOf(director.email), await idOf(singer.email)]
    type Entry = { action: string, actorId: number | null, actor: string | null, ensembleId: number | null, target: { type: string, id: number } | null, before: any, after: any }
    const audit = async (action: string): Promise<Entry[]> => {
      const r = await app.fetch(`/api/admin/audit?action=${action}&ensembleId=${ensembleId}`, { cookie: adminCookie })
      expect(r.status).toBe(200)
      return (await r.json()).items
    }
    const invitations = await audit('invitation')
    expect(invitations.find(e => e.action === 'invitation.created' && e.after?.email === singer.email)).toMatchObject({ actorId: directorId, ensembleId })
    expect(invitations.find(e => e.action === 'invitation.accepted' && e.actorId === singerId)).toMatchObject({ actor: singer.name, after: { role: 'player', userId: singerId } })
    const roles = await audit('member.role_changed')
    expect(roles[0]).toMatchObject({ actorId: directorId, target: { type: 'user', id: singerId }, before: { role: 'player' }, after: { role: 'section_leader' } })
    // The audit log is the site admin's only.
    expect((await app.fetch('/api/admin/audit', { cookie: await app.login(director.email) })).status).toBe(403)

    // The same rows on the admin's audit page, on a phone.
    const auditCtx = await browser.newContext({ viewport: { width: 390, height: 844 } })
    const ap = await auditCtx.newPage()
    await signIn(ap, admin)
    await ap.goto(`${app.url}/admin/audit?action=member&ensembleId=${ensembleId}`)
    await ap.getByRole('heading', { level: 1 }).waitFor()
    await expect.poll(async () => (await ap.locator('main').textContent()) ?? '', { timeout: 10_000 }).toContain(singer.name)
    expect(await fitsWidth(ap)).toBe(true)
    await auditCtx.close()
  })
})

describe('the ensemble screens at phone width', () => {
  it('settings, sections, members and invitations fit 390 px and work by keyboard', async () => {
    const ctx = await browser.newContext({ viewport: { width: 390, height: 844 } })
    const page = await ctx.newPage()
    await signIn(page, director.email)
    await page.goto(`${app.url}/ensembles`)
    const href = await page.getByRole('link', { name: director.ensemble }).getAttribute('href')
    for (const path of ['', '/members', '/invitations']) {
      await page.goto(`${app.url}${href}${path}`)
      await page.getByRole('heading', { level: 1, name: director.ensemble }).waitFor()
      expect(await fitsWidth(page), `${href}${path} at 390 px`).toBe(true)
    }
    // Settings: an out-of-range reference pitch is named beside its field and nothing is saved.
    await page.goto(`${app.url}${href}`)
    await page.getByLabel('Reference pitch A4 (Hz)').fill('470')
    await page.getByRole('button', { name: 'Save settings' }).click()
    expect(await page.getByText('The reference pitch must be at most 466 Hz').isVisible()).toBe(true)
    expect(await page.evaluate(() => document.activeElement?.getAttribute('aria-invalid'))).toBe('true')
    // Sections: rename by keyboard; a name in use is refused.
    await page.getByRole('button', { name: 'Rename Alto' }).focus()
    await page.keyboard.press('Enter')
    await page.keyboard.press('ControlOrMeta+a')
    await page.keyboard.type('soprano')
    await page.keyboard.press('Enter')
    await page.getByRole('alert').filter({ hasText: 'Another section already has that name' }).waitFor()
    await page.keyboard.press('Escape')
    expect(await page.evaluate(() => document.activeElement?.textContent?.trim())).toBe('↑')
    // Bulk list: bad rows are marked before anything is sent.
    await page.goto(`${app.url}${href}/invitations`)
    await page.getByRole('button', { name: 'A list (CSV)' }).click()
    await page.getByLabel('Paste the list').fill('name;email;section\nAna Ruiz;ana.ruiz@example.org;Alto\nNo Mail;nomail;Alto\n')
    await page.getByRole('button', { name: 'Check the list' }).click()
    await page.getByText('1 of 2 rows can be sent; 1 has problems and will be left out.').waitFor()
    expect(await page.getByRole('table').textContent()).toContain('"nomail" is not an e-mail address')
    expect(await fitsWidth(page)).toBe(true)
    await ctx.close()
  })
})

describe('who sees which members, and the reading, at phone width', () => {
  it('shows a section leader their own section only, and the reading a player picks on the account page on the director\'s members page', async () => {
    const dirCookie = await app.login(director.email)
    const ensembleId = ((await (await app.fetch('/api/ensembles', { cookie: dirCookie })).json()) as { id: number, name: string }[]).find(e => e.name === director.ensemble)!.id
    const all = (await (await app.fetch(`/api/ensembles/${ensembleId}/members?pageSize=100`, { cookie: dirCookie })).json()).items as { userId: number, name: string, email: string, role: string, section: string | null, sectionId: number | null }[]
    const leader = accounts.find(a => a.role === 'section leader' && a.ensemble === director.ensemble && all.find(m => m.email === a.email)?.sectionId != null)!
    const section = all.find(m => m.email === leader.email)!.section!
    const inSection = all.filter(m => m.section === section)
    const outside = all.find(m => m.section !== section)!

    // The rule: section leaders see their section, without addresses.
    const ctx = await browser.newContext({ viewport: { width: 390, height: 844 } })
    const page = await ctx.newPage()
    await signIn(page, leader.email)
    await page.goto(`${app.url}/ensembles/${ensembleId}/members`)
    await page.getByText(`As section leader you see the ${section} section.`).waitFor()
    await page.getByRole('table').waitFor()
    const table = (await page.getByRole('table').textContent()) ?? ''
    for (const m of inSection) expect(table).toContain(m.name)
    expect(table).not.toContain(outside.name)
    expect(table).not.toContain('@example.org')
    expect(await page.getByLabel('Section', { exact: true }).count()).toBe(0) // no filter to choose another section
    expect(await fitsWidth(page)).toBe(true)
    await ctx.close()

    // A player picks written pitch on the account page; the director's members page shows it as their choice.
    const player = accounts.find(a => a.role === 'player' && a.ensemble === director.ensemble && accounts.every(o => o.email !== a.email || o.role === 'player'))!
    const pctx = await browser.newContext({ viewport: { width: 390, height: 844 } })
    const pp = await pctx.newPage()
    await signIn(pp, player.email)
    await pp.goto(`${app.url}/account`)
    await pp.getByText('Each ensemble uses this unless its director sets another reading for you there.').waitFor()
    await pp.getByLabel('Written pitch (as printed for my instrument)').check()
    await pp.getByRole('button', { name: 'Save profile' }).click()
    await pp.getByText('Profile saved.').waitFor()
    expect(await fitsWidth(pp)).toBe(true)
    await pctx.close()

    const name = all.find(m => m.email === player.email)!.name
    const dctx = await browser.newContext({ viewport: { width: 390, height: 844 } })
    const dp = await dctx.newPage()
    await signIn(dp, director.email)
    await dp.goto(`${app.url}/ensembles/${ensembleId}/members`)
    await dp.getByLabel('Search').fill(name)
    const row = dp.getByRole('row').filter({ hasText: name })
    await expect.poll(() => row.first().textContent(), { timeout: 10_000 }).toContain("reads written pitch (their account's choice)")
    // The director sets concert pitch for this ensemble: it wins over the account's choice.
    await row.first().getByRole('button', { name: `Edit ${name}` }).click()
    const editor = dp.getByRole('form', { name: `Edit ${name}` })
    expect(await editor.getByLabel("Their account's choice (now written pitch)").isChecked()).toBe(true)
    await editor.getByLabel('Concert pitch', { exact: true }).check()
    await editor.getByRole('button', { name: 'Save' }).click()
    await expect.poll(() => row.first().textContent(), { timeout: 10_000 }).toContain('reads concert pitch')
    expect(await row.first().textContent()).not.toContain("their account's choice")
    expect(await fitsWidth(dp)).toBe(true)
    await dctx.close()
  })
})
