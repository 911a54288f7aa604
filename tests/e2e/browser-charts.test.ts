// The charts screens in Chromium on a seeded ensemble (the volume seed, small, with two
// assignments): a director, a section leader and a player each open their charts; a filter
// changes the figures; a chart's table opens from its toggle; phones at 390 px never scroll
// sideways; the rehearsal report renders for print with the screen-only parts hidden.
import { mkdtempSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import Database from 'better-sqlite3'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, Page } from 'playwright-core'
import { appReady, demoPassword, launchBrowser, startApp, type App } from './harness'
import { seedVolume, VOLUME_DIRECTOR } from '../../scripts/seed-volume'
import { dbQuery } from './takes-helpers'
import { recordAssignees } from './charts-helpers'

let app: App
let browser: Browser
let ensembleId: number
let director: string
const people = { leader: '', leaderSection: '', player: '', playerName: '' }

beforeAll(async () => {
  const dir = mkdtempSync(join(tmpdir(), 'driftline-browser-charts-'))
  const file = join(dir, 'driftline.sqlite')
  await seedVolume({ file, players: 16, takesPerPlayer: 5 })
  const raw = new Database(file)
  const ens = raw.prepare('select id from ensembles').get() as { id: number }
  const drill = raw.prepare('select id from drills order by id limit 1').get() as { id: number }
  const now = new Date().toISOString()
  const a = Number(raw.prepare('insert into assignments (ensemble_id, drill_id, title, created_at, updated_at) values (?, ?, ?, ?, ?)').run(ens.id, drill.id, 'Everyone: the first drill', now, now).lastInsertRowid)
  recordAssignees(raw, ens.id, [[a, null]])
  raw.prepare('update takes set assignment_id = ? where id in (select min(id) from takes group by user_id limit 4)').run(a)
  raw.close()
  app = await startApp({ dir, seed: false })
  browser = await launchBrowser()
  ensembleId = ens.id
  director = await app.login(VOLUME_DIRECTOR)
  const leader = dbQuery<{ email: string, section: string }>(app, "select u.email, s.name as section from memberships m join users u on u.id = m.user_id join sections s on s.id = m.section_id where m.role = 'section_leader' order by s.position limit 1")[0]!
  const player = dbQuery<{ email: string, name: string }>(app, "select u.email, u.name from memberships m join users u on u.id = m.user_id where m.role = 'player' order by u.id limit 1")[0]!
  Object.assign(people, { leader: leader.email, leaderSection: leader.section, player: player.email, playerName: player.name })
}, 180_000)

afterAll(async () => {
  await browser?.close()
  await app?.stop()
})

async function signedIn(email: string, width: number): Promise<Page> {
  const context = await browser.newContext(width <= 390 ? { viewport: { width, height: 844 }, isMobile: true, hasTouch: true } : { viewport: { width, height: 900 } })
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
async function expectFitsScreen(page: Page, width = 390) {
  expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(width)
}

const summary = (page: Page) => page.getByTestId('charts-summary').innerText()

describe('charts in the browser', () => {
  it('a director sees the ensemble, opens a chart’s numbers and narrows the figures with a filter', { timeout: 240_000 }, async () => {
    const page = await signedIn(VOLUME_DIRECTOR, 1280)
    await page.getByRole('link', { name: 'Charts' }).first().click()
    await page.waitForURL(/\/charts/)
    await page.getByTestId('charts').waitFor()
    expect(await page.getByRole('tab').allInnerTexts()).toEqual(['Ensemble', 'Section', 'Player'])
    const all = await (await app.fetch(`/api/ensembles/${ensembleId}/stats`, { cookie: director })).json()
    expect(await summary(page)).toContain(`${all.takes} takes`)
    // The charts are drawn (chart.js canvases with a size).
    expect(await page.locator('.charts-canvas canvas').count()).toBeGreaterThan(0)
    expect(await page.locator('.charts-canvas canvas').first().evaluate(c => (c as HTMLCanvasElement).width)).toBeGreaterThan(0)

    const panel = page.locator('section', { has: page.getByRole('heading', { name: 'Sections side by side' }) })
    const toggle = panel.getByRole('button', { name: 'Show the numbers' })
    expect(await toggle.getAttribute('aria-expanded')).toBe('false')
    await toggle.click()
    expect(await panel.getByRole('button', { name: 'Hide the numbers' }).getAttribute('aria-expanded')).toBe('true')
    await panel.getByTestId('sections-table').waitFor({ state: 'visible' })
    expect(await panel.getByTestId('sections-table').locator('tbody tr').count()).toBe(8)

    // A drill filter: the figures become that drill's.
    const drill = dbQuery<{ id: number, title: string }>(app, 'select id, title from drills order by id limit 1')[0]!
    const one = await (await app.fetch(`/api/ensembles/${ensembleId}/stats?drillId=${drill.id}`, { cookie: director })).json()
    expect(one.takes).toBeLessThan(all.takes)
    await page.getByLabel('Drill', { exact: true }).first().selectOption(String(drill.id))
    await page.getByRole('button', { name: 'Apply filters' }).click()
    await page.waitForURL(new RegExp(`drillId=${drill.id}`))
    await expect.poll(() => summary(page)).toContain(`${one.takes} takes`)

    // A date range the wrong way round is refused in the form, focus on the field.
    await page.getByLabel('From', { exact: true }).fill('2026-05-01')
    await page.getByLabel('To', { exact: true }).fill('2026-04-01')
    await page.getByRole('button', { name: 'Apply filters' }).click()
    await page.getByText('“To” must not be before “From”.').waitFor()
    expect(await page.evaluate(() => document.activeElement?.getAttribute('aria-invalid'))).toBe('true')
    expect(page.url()).not.toContain('from=')

    // The CSV link carries the same filters.
    expect(await page.getByTestId('csv-link').getAttribute('href')).toBe(`/api/ensembles/${ensembleId}/holds.csv?drillId=${drill.id}`)
    await page.context().close()
  })

  it('a section leader on a phone gets their section: the hold × player grid with a signed number in each cell', { timeout: 240_000 }, async () => {
    const page = await signedIn(people.leader, 390)
    await page.goto(`${app.url}/charts`)
    await page.getByTestId('charts').waitFor()
    expect(await page.getByRole('tab').allInnerTexts()).toEqual(['Section', 'Player'])
    await expect.poll(() => page.getByRole('heading', { level: 1 }).innerText()).toBe(people.leaderSection)
    const cells = page.getByTestId('hold-grid').locator('td[data-token]')
    expect(await cells.count()).toBeGreaterThan(0)
    for (const text of await cells.allInnerTexts()) expect(text).toMatch(/^[+\u2212]?\d+\.\d ¢/)
    await expectFitsScreen(page)
    // On a phone the filters fold behind a button; a tolerance re-scores the grid.
    const filtersButton = page.getByRole('button', { name: 'Filters' })
    expect(await filtersButton.getAttribute('aria-expanded')).toBe('false')
    expect(await page.getByLabel('Tolerance (± ¢)').isVisible()).toBe(false)
    await filtersButton.click()
    await page.getByLabel('Tolerance (± ¢)').fill('50')
    await page.getByRole('button', { name: 'Apply filters' }).click()
    await page.waitForURL(/tolerance=50/)
    // Within ± tolerance is in tune (the meaning of a tolerance, common practice): every cell whose
    // number is within ±50 ¢ is now drawn in tune, and the others flat or sharp by their sign.
    const misdrawn = async () => (await cells.evaluateAll(els => els.map(e => [e.textContent ?? '', e.getAttribute('data-token') ?? ''])))
      .filter(([text = '', token = '']) => {
        const v = Number(text.trim().split(' ')[0]!.replace('\u2212', '-'))
        return Math.abs(v) <= 50 ? token !== 'in-tune' : !token.startsWith(v < 0 ? 'flat' : 'sharp')
      }).length
    await expect.poll(misdrawn).toBe(0)
    expect(await cells.count()).toBeGreaterThan(0)
    await expectFitsScreen(page)
    // Arrow keys move between the views.
    await page.getByRole('tab', { name: 'Section' }).focus()
    await page.keyboard.press('ArrowRight')
    await page.waitForURL(/view=player/)
    await page.getByRole('heading', { name: 'Cents from target per chord member' }).waitFor()
    await expectFitsScreen(page)
    // The section leader's rehearsal report is their section's, and fits the phone too.
    await page.getByRole('tab', { name: 'Section' }).click()
    await page.getByTestId('report-link').click()
    await page.waitForURL(/\/charts\/report/)
    await page.getByTestId('report-summary').waitFor()
    expect(await page.getByRole('heading', { level: 1 }).innerText()).toBe(people.leaderSection)
    await expectFitsScreen(page)
    await page.context().close()
  })

  it('a player on a phone sees only their own charts, and opens a table', { timeout: 240_000 }, async () => {
    const page = await signedIn(people.player, 390)
    // On a phone the screen is in the menu.
    await page.getByRole('button', { name: 'Menu' }).click()
    await page.getByRole('navigation', { name: 'Main (compact)' }).getByRole('link', { name: 'Charts' }).click()
    await page.waitForURL(/\/charts/)
    await page.getByTestId('charts').waitFor()
    expect(await page.getByRole('tab').count()).toBe(0)
    expect(await page.getByRole('heading', { level: 1 }).innerText()).toBe('My takes')
    const mine = await (await app.fetch(`/api/ensembles/${ensembleId}/stats`, { cookie: await app.login(people.player) })).json()
    expect(await summary(page)).toContain(`${mine.takes} takes`)
    const panel = page.locator('section', { has: page.getByRole('heading', { name: 'Drift per take' }) })
    await panel.getByRole('button', { name: 'Show the numbers' }).click()
    expect(await panel.getByTestId('drift-table').locator('tbody tr').count()).toBe(mine.takes)
    await expectFitsScreen(page)
    await page.context().close()
  })

  it('the rehearsal report renders for print: charts, worst holds, who has not sent a take', { timeout: 240_000 }, async () => {
    const page = await signedIn(VOLUME_DIRECTOR, 1280)
    await page.goto(`${app.url}/charts`)
    await page.getByTestId('report-link').click()
    await page.waitForURL(/\/charts\/report/)
    await page.getByTestId('report-summary').waitFor()
    await page.emulateMedia({ media: 'print' })
    expect(await page.locator('body > #__nuxt header').first().isVisible()).toBe(false)
    expect(await page.getByRole('button', { name: 'Print or save as PDF' }).isVisible()).toBe(false)
    expect(await page.getByRole('button', { name: /Show the numbers|Hide the numbers/ }).first().isVisible()).toBe(false)
    expect(await page.getByTestId('worst-holds-table').isVisible()).toBe(true)
    expect(await page.getByTestId('member-box-table').isVisible()).toBe(true)
    const missing = await page.getByTestId('missing-list').innerText()
    expect(missing).toContain('Everyone: the first drill')
    expect(await page.locator('.charts-canvas canvas').count()).toBeGreaterThan(0)
    const pdf = await page.pdf({ format: 'A4' })
    expect(pdf.subarray(0, 5).toString()).toBe('%PDF-')
    await page.context().close()
  })
})
