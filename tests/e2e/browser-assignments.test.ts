// The week of a director and a player, in Chromium: the director writes a four-chord drill in the
// voicing grid, plays the practice tones (the audio context runs), assigns the drill to the Alto
// section from its page; an alto signs in, finds it due on Home, records against it with the
// browser's fake microphone; the take is linked to the assignment and the director's completion
// view shows it. The assignment pages also fit a 390-px phone.
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, BrowserContext, Page } from 'playwright-core'
import { appReady, CHROMIUM, CHROMIUM_ARGS, demoPassword, startApp, type App } from './harness'
import { dbQuery } from './takes-helpers'

const DIRECTOR = 'helena.marsh@example.org'
const ALTO = 'june.whitaker@example.org'
const TITLE = 'Four chords for the altos'
let app: App
let browser: Browser
const state = { drillId: 0, assignmentId: 0, ensembleId: 0, takeId: 0 }

beforeAll(async () => {
  app = await startApp({ env: { NUXT_ANALYSIS_WORKERS: '0', NUXT_ASSIGNMENTS_POLL_MS: '300' } })
  const { chromium } = await import('playwright-core')
  // Chromium's fake microphone (a test tone) stands in for the singer.
  browser = await chromium.launch({ executablePath: CHROMIUM, headless: true, args: [...CHROMIUM_ARGS, '--use-fake-device-for-media-stream', '--use-fake-ui-for-media-stream'] })
}, 120_000)
afterAll(async () => {
  await browser?.close()
  await app?.stop()
})

async function newPage(width = 1280, height = 900): Promise<{ context: BrowserContext, page: Page }> {
  const context = await browser.newContext({ viewport: { width, height } })
  await context.grantPermissions(['microphone'], { origin: app.url })
  // Every AudioContext the page makes is kept where the test can read its state.
  await context.addInitScript(() => {
    const Orig = window.AudioContext
    const made: AudioContext[] = []
    ;(window as any).__audioContexts = made
    window.AudioContext = class extends Orig {
      constructor(...args: ConstructorParameters<typeof AudioContext>) { super(...args); made.push(this) }
    } as typeof AudioContext
  })
  const page = await context.newPage()
  page.setDefaultTimeout(60_000)
  page.setDefaultNavigationTimeout(90_000)
  return { context, page }
}

async function signIn(page: Page, email: string) {
  await page.goto(`${app.url}/login`)
  await appReady(page)
  await page.getByLabel('E-mail').fill(email)
  await page.getByLabel('Password').fill(demoPassword())
  await page.getByLabel('Password').press('Enter')
  await page.waitForURL(`${app.url}/`)
}

const audioStates = (page: Page) => page.evaluate(() => ((window as any).__audioContexts as AudioContext[]).map(c => c.state))
const pageWidth = (page: Page) => page.evaluate(() => document.documentElement.scrollWidth)
const cell = (page: Page, part: number, chord: number) => page.locator(`[data-cell="${part}:${chord}"]`)
async function typeChord(page: Page, cells: string[]) {
  for (const [i, keys] of cells.entries()) {
    for (const k of keys) await page.keyboard.press(k)
    if (i < cells.length - 1) await page.keyboard.press('Tab')
  }
}

describe('assigning a drill and recording against it', () => {
  it('director: writes four chords, plays the tones, assigns the drill to the altos', { timeout: 300_000 }, async () => {
    const { context, page } = await newPage()
    await signIn(page, DIRECTOR)
    await page.goto(`${app.url}/drills/new`)
    await appReady(page)
    await page.getByLabel('Title', { exact: true }).fill(TITLE)
    await cell(page, 0, 0).click()
    await typeChord(page, ['e4', 'c4', 'g3', 'c3']) // I in C major (common practice voicing)
    await page.keyboard.press('Control+Enter')
    await typeChord(page, ['f4', 'c4', 'a3', 'f2']) // IV
    await page.keyboard.press('Control+Enter')
    await typeChord(page, ['d4', 'b3', 'g3', 'g2']) // V
    await page.keyboard.press('Control+Enter')
    await typeChord(page, ['e4', 'c4', 'g3', 'c3']) // I
    await page.getByTestId('save-drill').click()
    await page.waitForURL(/\/drills\/\d+$/)
    state.drillId = Number(new URL(page.url()).pathname.split('/').pop())

    // Practice tones: the audio context runs once Play is pressed; then they stop.
    await page.getByTestId('play-drill').click()
    await expect.poll(() => audioStates(page)).toContain('running')
    await page.getByTestId('stop-tones').click()

    // From the drill's page to the assignment form, with the drill chosen.
    await page.getByTestId('assign-link').click()
    await page.waitForURL(/\/assignments\?/)
    const form = page.getByRole('form', { name: 'New assignment' })
    await form.waitFor()
    expect(await page.getByTestId('assignment-drill').inputValue()).toBe(String(state.drillId))
    // Nobody chosen: the form says so and sends nothing.
    await page.getByTestId('assignment-save').click()
    await expect.poll(() => form.locator('.field-error').first().textContent()).toContain('at least one section or player')
    await page.getByTestId('assign-section-Alto').check()
    // The part the altos record: by default the part named like their section.
    await expect.poll(() => form.getByRole('combobox', { name: 'Alto' }).locator('option').first().textContent()).toContain('Alto (named like the section)')
    await page.getByTestId('assignment-save').click()
    await expect.poll(() => page.getByRole('status').filter({ hasText: 'Assigned to' }).count()).toBe(1)
    const row = page.getByTestId('assignment-table').getByRole('row', { name: new RegExp(TITLE) })
    await row.waitFor()
    expect(await row.textContent()).toContain('0 of 3')
    await context.close()

    const cookie = await app.login(DIRECTOR)
    const ensembles = await (await app.fetch('/api/ensembles', { cookie })).json() as { id: number, name: string }[]
    state.ensembleId = ensembles.find(e => /Choir/.test(e.name))!.id
    const list = await (await app.fetch(`/api/ensembles/${state.ensembleId}/assignments`, { cookie })).json() as { items: { id: number, drillId: number }[] }
    state.assignmentId = list.items.find(a => a.drillId === state.drillId)!.id
  })

  it('player: sees it due on Home and records against it with the microphone', { timeout: 300_000 }, async () => {
    const { context, page } = await newPage(390, 900)
    await signIn(page, ALTO)
    const item = page.locator('li', { hasText: TITLE })
    await item.waitFor()
    expect(await item.textContent()).toContain('Alto')
    expect(await item.textContent()).toMatch(/Due/)
    expect(await item.getByText('Not submitted yet').count()).toBe(1)
    expect(await pageWidth(page)).toBeLessThanOrEqual(390)
    await item.getByRole('link', { name: /Record or upload a take/ }).click()
    await page.waitForURL(/\/takes\/new\?/)
    expect(new URL(page.url()).searchParams.get('assignmentId')).toBe(String(state.assignmentId))
    expect(await page.getByLabel('Part').inputValue()).toBe('Alto')
    await expect.poll(() => page.getByTestId('take-assignment').textContent()).toContain(TITLE)

    const record = page.getByRole('radio', { name: 'Record here' })
    await page.locator('label', { has: record }).click()
    await page.getByRole('button', { name: /Use the microphone/ }).click()
    await page.getByRole('button', { name: 'Start recording' }).click()
    await page.getByText(/Recording \d/).waitFor()
    await page.waitForTimeout(2500)
    await page.getByRole('button', { name: 'Stop', exact: true }).first().click()
    await page.getByRole('button', { name: 'Use this take' }).click()
    await page.getByRole('button', { name: 'Send take' }).click()
    await page.waitForURL(/\/takes\/\d+$/)
    state.takeId = Number(new URL(page.url()).pathname.split('/').pop())
    expect(dbQuery(app, 'select assignment_id, part from takes where id = ?', state.takeId)[0]).toEqual({ assignment_id: state.assignmentId, part: 'Alto' })

    // Home now says it is submitted; the Assignments page too, and both fit the phone.
    await page.goto(`${app.url}/`)
    await expect.poll(() => page.locator('li', { hasText: TITLE }).locator('[data-submitted="true"]').count()).toBe(1)
    await page.goto(`${app.url}/assignments`)
    await page.getByTestId('my-assignments').locator('li[data-status="submitted"]', { hasText: TITLE }).waitFor()
    expect(await pageWidth(page)).toBeLessThanOrEqual(390)
    await context.close()
  })

  it('director: the completion view shows the take, per section and player, also at 390 px', { timeout: 300_000 }, async () => {
    for (const width of [1280, 390]) {
      const { context, page } = await newPage(width, 900)
      await signIn(page, DIRECTOR)
      await page.goto(`${app.url}/ensembles/${state.ensembleId}/assignments/${state.assignmentId}`)
      const section = page.getByTestId('completion-section').filter({ hasText: 'Alto' })
      await section.waitFor()
      expect(await section.locator('tr[data-submitted]').count()).toBe(3)
      const june = section.locator('tr[data-submitted="true"]')
      expect(await june.count()).toBe(1)
      expect(await june.getByTestId('completion-take').getAttribute('href')).toBe(`/takes/${state.takeId}`)
      expect(await section.locator('tr[data-submitted="false"]').count()).toBe(2)
      expect(await pageWidth(page)).toBeLessThanOrEqual(width)
      if (width === 390) {
        await page.goto(`${app.url}/assignments?ensemble=${state.ensembleId}`)
        await page.getByTestId('new-assignment').click()
        await page.getByRole('form', { name: 'New assignment' }).waitFor()
        expect(await pageWidth(page)).toBeLessThanOrEqual(390)
      }
      await context.close()
    }
  })

  it('director: the server draws the ensemble\'s assignments the browser then hydrates, with no false "nothing assigned"', { timeout: 300_000 }, async () => {
    for (const path of ['/assignments', `/assignments?ensemble=${state.ensembleId}`]) {
      const { context, page } = await newPage(390, 900)
      await signIn(page, DIRECTOR)
      const problems: string[] = []
      page.on('console', (m) => { if (/hydrat|mismatch/i.test(m.text())) problems.push(m.text()) })
      const res = await page.goto(`${app.url}${path}`)
      // The page as the server sent it, before any script ran.
      const html = await res!.text()
      expect(html).toContain(TITLE)
      expect(html).not.toContain('No assignments yet')
      await appReady(page)
      await page.getByText(TITLE).first().waitFor()
      expect(await page.getByText('No assignments yet').count()).toBe(0)
      expect(problems).toEqual([])
      await context.close()
    }
  })
})
