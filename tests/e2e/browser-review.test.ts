// Reviewing in Chromium: a section leader finds a take in the review queue, pins a note to a
// moment of its waveform, approves it; the player signs in and reads the note at that moment and
// hold, and the verdict, on the report and on Home. On a 390-px phone screen, and the queue on a
// desktop screen through the main navigation.
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, Page } from 'playwright-core'
import { appReady, demoPassword, launchBrowser, startApp, type App } from './harness'
import { retryStaleSockets, waitForTake } from './takes-helpers'

const LEADER = 'aisha.bello@example.org' // leads the Sopranos
const PLAYER = 'clara.lindqvist@example.org' // a Soprano

let app: App
let browser: Browser
let takeId = 0
let hold2: { startS: number, endS: number, note: string }
let durationS = 0

beforeAll(async () => {
  app = retryStaleSockets(await startApp())
  browser = await launchBrowser()
  const player = await app.login(PLAYER)
  const mine = await (await app.fetch('/api/takes?player=me', { cookie: player })).json() as { items: Array<{ id: number }> }
  takeId = mine.items[0]!.id
  const t = await waitForTake(app, player, takeId, 180_000)
  expect(t.status).toBe('analysed')
  hold2 = t.report.holds[1]
  durationS = t.report.take.durationS
}, 240_000)

afterAll(async () => {
  await browser?.close()
  await app?.stop()
})

async function signIn(email: string, width: number): Promise<Page> {
  const context = await browser.newContext(width <= 400 ? { viewport: { width, height: 844 }, isMobile: true, hasTouch: true } : { viewport: { width, height: 900 } })
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

/** Nothing on the page scrolls sideways on a phone. */
async function expectFits(page: Page, width = 390) {
  expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBe(width)
}

describe('reviewing a take', () => {
  it('shows the queue from the main navigation on a desktop screen', { timeout: 120_000 }, async () => {
    const page = await signIn(LEADER, 1280)
    try {
      await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Review' }).click()
      await page.getByRole('heading', { level: 1, name: 'Review queue' }).waitFor()
      await expect.poll(() => page.getByTestId('review-queue').getByRole('link', { name: /Clara Lindqvist/ }).count()).toBeGreaterThan(0)
    } finally { await page.context().close() }
  })

  it('lets a section leader pin a note at a moment and approve the take, on a phone', { timeout: 240_000 }, async () => {
    const page = await signIn(LEADER, 390)
    try {
      await page.goto(`${app.url}/review`)
      await page.getByRole('heading', { level: 1, name: 'Review queue' }).waitFor()
      await expectFits(page)
      await page.locator(`[data-testid="review-queue"] a[href="/takes/${takeId}"]`).click()
      await page.waitForURL(`${app.url}/takes/${takeId}`)
      const panel = page.getByTestId('review-panel')
      await panel.waitFor()

      // Wait for the waveform to be drawn, then click where the second hold sounds.
      // (the play button is enabled once the recording is decoded and drawn).
      await expect.poll(() => page.getByRole('button', { name: 'Play the take' }).isEnabled(), { timeout: 60_000 }).toBe(true)
      const wave = page.getByTestId('waveform')
      await wave.scrollIntoViewIfNeeded()
      const box = (await wave.boundingBox())!
      const at = (hold2.startS + hold2.endS) / 2
      await page.mouse.click(box.x + box.width * (at / durationS), box.y + box.height / 2)
      const moment = panel.getByLabel('Moment, seconds from the start')
      await moment.waitFor()
      // One pixel of a phone-wide waveform is a few hundredths of a second of this take.
      expect(Math.abs(Number(await moment.inputValue()) - at)).toBeLessThan(0.25)
      await expect.poll(() => panel.getByText(/Hold 2 · /).count()).toBeGreaterThan(0)

      await panel.getByLabel('New note', { exact: true }).fill('Lean on the air here: the note sinks at the end.')
      await panel.getByRole('button', { name: 'Add the note' }).click()
      await panel.getByRole('radio', { name: 'Approved' }).check()
      await panel.getByLabel('Note on the whole take').fill('Well prepared.')
      await expectFits(page)
      await panel.getByRole('button', { name: 'Save the review' }).click()
      await page.getByTestId('review-saved').waitFor()
      await expect.poll(() => page.getByTestId('take-verdict').textContent()).toContain('Approved')
    } finally { await page.context().close() }

    // Saved as sent: the note at that moment, on the second hold.
    const leader = await app.login(LEADER)
    const take = await (await app.fetch(`/api/takes/${takeId}`, { cookie: leader })).json() as { reviews: Array<{ verdict: string, notes: Array<{ atS: number, holdIndex: number | null }> }> }
    expect(take.reviews).toHaveLength(1)
    expect(take.reviews[0]!.verdict).toBe('approved')
    expect(take.reviews[0]!.notes[0]!.holdIndex).toBe(1)
    // The take has left the queue.
    const queue = await (await app.fetch('/api/reviews/queue?pageSize=100', { cookie: leader })).json() as { items: Array<{ takeId: number }> }
    expect(queue.items.map(i => i.takeId)).not.toContain(takeId)
  })

  it('shows the player the note at its moment and hold and the verdict, on the report and on Home', { timeout: 180_000 }, async () => {
    const page = await signIn(PLAYER, 390)
    try {
      await expect.poll(() => page.getByTestId('recent-verdict').first().textContent()).toContain('Approved')
      await page.goto(`${app.url}/takes/${takeId}`)
      await page.getByTestId('review-list').waitFor()
      await expectFits(page)
      expect(await page.getByTestId('take-verdict').textContent()).toContain('Approved')
      expect(await page.getByTestId('verdict').first().textContent()).toContain('Approved')
      const note = page.getByTestId('review-note').filter({ hasText: 'Lean on the air here' })
      const text = (await note.textContent())!.replace(/\s+/g, ' ')
      expect(text).toContain(`hold 2 · ${hold2.note}`)
      expect(text).toMatch(/At \d+:\d\d\.\d/)
      expect(await page.getByText('Well prepared.').count()).toBe(1)
      // The player reads; the form is the reviewer's only.
      expect(await page.getByTestId('review-panel').count()).toBe(0)
    } finally { await page.context().close() }
  })
})
