// A director writes a four-chord drill in the voicing grid from the keyboard, saves it, plays the
// practice tones (the page's AudioContext runs), and meets a clear conflict when another save got
// there first; the editor and the drill page also fit a 390-px phone.
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, BrowserContext, Page } from 'playwright-core'
import { appReady, demoPassword, launchBrowser, startApp, type App } from './harness'

const DIRECTOR = 'helena.marsh@example.org'
let app: App
let browser: Browser
let drillId: number

beforeAll(async () => {
  app = await startApp({ env: { NUXT_ANALYSIS_WORKERS: '0' } })
  browser = await launchBrowser()
})
afterAll(async () => {
  await browser?.close()
  await app?.stop()
})

async function newPage(width = 1280, height = 900): Promise<{ context: BrowserContext, page: Page }> {
  const context = await browser.newContext({ viewport: { width, height } })
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

async function signIn(page: Page) {
  await page.goto(`${app.url}/login`)
  await appReady(page)
  await page.getByLabel('E-mail').fill(DIRECTOR)
  await page.getByLabel('Password').fill(demoPassword())
  await page.getByLabel('Password').press('Enter')
  await page.waitForURL(`${app.url}/`)
}

const audioStates = (page: Page) => page.evaluate(() => ((window as any).__audioContexts as AudioContext[]).map(c => c.state))
const pageWidth = (page: Page) => page.evaluate(() => document.documentElement.scrollWidth)

/** Types into the focused grid cell and the ones after it: each entry is a cell's keys, Tab between. */
async function typeChord(page: Page, cells: string[]) {
  for (const [i, keys] of cells.entries()) {
    for (const k of keys) await page.keyboard.press(k)
    if (i < cells.length - 1) await page.keyboard.press('Tab')
  }
}

const cell = (page: Page, part: number, chord: number) => page.locator(`[data-cell="${part}:${chord}"]`)

describe('writing a drill in the voicing grid', () => {
  it('builds four chords from the keyboard, saves, and plays the practice tones', { timeout: 300_000 }, async () => {
    const { context, page } = await newPage()
    await signIn(page)
    await page.goto(`${app.url}/drills`)
    await page.getByTestId('new-drill').click()
    await page.waitForURL(`${app.url}/drills/new`)
    await page.getByLabel('Title', { exact: true }).fill('Four chords in C')

    // Saving with blank cells says which ones, by chord and part.
    await page.getByTestId('save-drill').click()
    await expect.poll(() => page.getByTestId('editor-issues').textContent()).toContain('Chord 1, Soprano: no note yet')

    await cell(page, 0, 0).click()
    await typeChord(page, ['e4', 'c4', 'g3', 'c3']) // I
    await page.keyboard.press('Control+Enter')
    await typeChord(page, ['f4', 'c4', 'a3', 'f2']) // IV
    await page.keyboard.press('Control+Enter')
    await typeChord(page, ['d4', 'b3', 'g3', 'g2']) // V
    await page.keyboard.press('Control+Enter')
    // The fourth chord is the first one again: copy its column and paste it.
    for (let i = 0; i < 3; i++) await page.keyboard.press('ArrowLeft')
    await page.keyboard.press('Control+c')
    for (let i = 0; i < 3; i++) await page.keyboard.press('ArrowRight')
    await page.keyboard.press('Control+v')
    // A slip and its undo.
    await page.keyboard.press('r')
    expect(await cell(page, 0, 3).textContent()).toContain('rest')
    await page.keyboard.press('Control+z')
    expect(await cell(page, 0, 3).textContent()).toContain('E4')

    // The engine names the chords, and every note shows its target in cents from equal temperament.
    await expect.poll(() => page.locator('#sym-0-hint').textContent()).toBe('read as C')
    expect(await page.locator('#sym-1-hint').textContent()).toBe('read as F')
    expect(await page.locator('#sym-2-hint').textContent()).toBe('read as G')
    expect(await cell(page, 0, 0).getByTestId('cell-cents').textContent()).toMatch(/¢/)

    await page.getByTestId('save-drill').click()
    await page.waitForURL(/\/drills\/\d+$/)
    drillId = Number(new URL(page.url()).pathname.split('/').pop())

    // What was saved is what was typed (concert pitch).
    const cookie = await app.login(DIRECTOR)
    const saved = await (await app.fetch(`/api/drills/${drillId}`, { cookie })).json() as { version: number, document: { title: string, chords: { notes: Record<string, string | null> }[] } }
    expect(saved.version).toBe(1)
    expect(saved.document.title).toBe('Four chords in C')
    expect(saved.document.chords.map(c => Object.values(c.notes))).toEqual([
      ['E4', 'C4', 'G3', 'C3'], ['F4', 'C4', 'A3', 'F2'], ['D4', 'B3', 'G3', 'G2'], ['E4', 'C4', 'G3', 'C3'],
    ])

    // Practice tones: the hearing caution is shown, and the audio context runs once Play is pressed.
    await expect.poll(() => page.getByTestId('practice-volume').textContent()).toContain('Headphones: start quiet')
    await page.getByTestId('play-drill').click()
    await expect.poll(() => audioStates(page)).toContain('running')
    await page.getByTestId('start-drone').click()
    await expect.poll(() => page.getByTestId('start-drone').getAttribute('aria-pressed')).toBe('true')
    await page.getByTestId('stop-tones').click()
    await expect.poll(() => page.getByTestId('start-drone').getAttribute('aria-pressed')).toBe('false')
    await context.close()
  })

  it('tells the director when another save got there first, and saves only when asked', { timeout: 300_000 }, async () => {
    const { context, page } = await newPage()
    await signIn(page)
    await page.goto(`${app.url}/drills/edit/${drillId}`)
    await appReady(page)
    await page.getByLabel('Title', { exact: true }).fill('Four chords in C, mine')

    // Meanwhile another director saves version 2.
    const cookie = await app.login(DIRECTOR)
    const current = await (await app.fetch(`/api/drills/${drillId}`, { cookie })).json() as { document: Record<string, unknown> }
    const other = await app.fetch(`/api/drills/${drillId}`, {
      method: 'PUT', cookie, headers: { 'content-type': 'application/json' },
      body: JSON.stringify({ document: { ...current.document, title: 'Four chords in C, theirs' }, version: 1 }),
    })
    expect(other.status).toBe(200)

    await page.getByTestId('save-drill').click()
    const alert = page.getByRole('alert').filter({ hasText: 'Someone else saved this drill' })
    await expect.poll(() => alert.textContent()).toContain('Version 2 was saved by Helena Marsh')
    let stored = await (await app.fetch(`/api/drills/${drillId}`, { cookie })).json() as { version: number, document: { title: string } }
    expect(stored).toMatchObject({ version: 2, document: { title: 'Four chords in C, theirs' } })

    await page.getByRole('button', { name: 'Save mine over version 2' }).click()
    await expect.poll(() => page.getByTestId('editor-status').textContent()).toContain('Saved (version 3)')
    stored = await (await app.fetch(`/api/drills/${drillId}`, { cookie })).json() as { version: number, document: { title: string } }
    expect(stored).toMatchObject({ version: 3, document: { title: 'Four chords in C, mine' } })
    await context.close()
  })

  it('works on a 390-px phone: the editor and the drill page fit, and the tones play', { timeout: 300_000 }, async () => {
    const { context, page } = await newPage(390, 844)
    await signIn(page)
    await page.goto(`${app.url}/drills/new`)
    await appReady(page)
    await cell(page, 0, 0).click()
    await typeChord(page, ['a4', 'f4', 'c4', 'f3'])
    expect(await cell(page, 3, 0).textContent()).toContain('F3')
    expect(await pageWidth(page)).toBe(390)

    await page.goto(`${app.url}/drills/edit/${drillId}`)
    await appReady(page)
    await cell(page, 0, 0).waitFor()
    expect(await pageWidth(page)).toBe(390)

    await page.goto(`${app.url}/drills/${drillId}`)
    await page.getByTestId('loop-chord').click()
    await expect.poll(() => audioStates(page)).toContain('running')
    expect(await pageWidth(page)).toBe(390)
    await page.getByTestId('stop-tones').click()

    await page.goto(`${app.url}/drills`)
    await page.getByLabel('Search drills').fill('four chords')
    await expect.poll(() => page.getByRole('link', { name: 'Four chords in C, mine', exact: true }).count()).toBe(1)
    expect(await pageWidth(page)).toBe(390)
    await context.close()
  })
})
