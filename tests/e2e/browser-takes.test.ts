// A choir player sends a take through the real pages in Chromium: signs in, opens a drill from
// the Drills page, uploads a synthesised WAV of their part, follows the live status and reads
// the report; and a file that is not audio gets a clear message and makes no take.
//
// The server the browser talks to runs no analysis workers, so a sent take is sure to be shown
// waiting however fast the machine is; a second server process on the same database and object
// store then works the queue (workers may run in another process: the take page follows the
// database), and the page shows the take analysed.
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, Page } from 'playwright-core'
import { appReady, demoAccounts, demoPassword, launchBrowser, startApp, type App } from './harness'
import { cents, retryStaleSockets } from './takes-helpers'
import { synthTakeWithTruth, type SynthSpec } from '../../server/analysis/synth'
import { encodeWav } from '../../server/analysis/wav'
import { computeTargets } from '../../shared/tuning/index'

/** How sharp the synthesised singer holds every note, in cents above the drill's target. */
const SHARP_CENTS = 8
const PART = 'Alto'
const SAMPLE_RATE = 22050
const LEAD_IN_S = 1

let app: App // serves the pages; no analysis workers
let analyser: App | undefined // the same data, one analysis worker, started when needed
let browser: Browser
let player: { email: string, cookie: string }
let drill: { id: number, title: string, document: any, open: { id: number }[] }

interface TakeList { items: { id: number }[], total: number }

beforeAll(async () => {
  const choir = demoAccounts().filter(a => a.role === 'player' && /choir/i.test(a.ensemble))
  if (!choir.length) throw new Error('README.md lists no choir player')
  app = retryStaleSockets(await startApp({ env: { NUXT_ANALYSIS_WORKERS: '0' } }))
  browser = await launchBrowser()

  // The first choir player who sings the part: the server says whose section it is
  // (preselectedPart); the README's table is only where the accounts are listed.
  for (const a of choir) {
    const cookie = await app.login(a.email)
    const ensembles = await (await app.fetch('/api/ensembles', { cookie })).json() as { id: number }[]
    for (const e of ensembles) {
      const drills = await (await app.fetch(`/api/ensembles/${e.id}/drills`, { cookie })).json() as { id: number, title: string, parts: { name: string }[], chords: number }[]
      // The drill with the part and the most chords: the most holds to check.
      const withPart = drills.filter(d => d.parts.some(p => p.name === PART)).sort((x, y) => y.chords - x.chords)[0]
      if (!withPart) continue
      const detail = await (await app.fetch(`/api/drills/${withPart.id}`, { cookie })).json() as any
      if (detail.preselectedPart !== PART) continue
      player = { email: a.email, cookie }
      // The player's open assignments of this drill and part: the take is to answer one of them.
      drill = { id: withPart.id, title: withPart.title, document: detail.document, open: detail.openAssignments.filter((o: any) => o.part === PART) }
      break
    }
    if (player) break
  }
  if (!player) throw new Error(`the demo has no ${PART} player with a drill`)
})

afterAll(async () => {
  await browser?.close()
  // The analyser shares the first server's folder, which goes when the first server stops.
  await analyser?.stop()
  await app?.stop()
})

async function newPage(): Promise<Page> {
  const context = await browser.newContext({ viewport: { width: 1280, height: 900 } })
  const page = await context.newPage()
  // A loaded 2-core machine: wait generously for conditions, never for a fixed time.
  page.setDefaultTimeout(60_000)
  page.setDefaultNavigationTimeout(90_000)
  return page
}

async function signIn(page: Page) {
  await page.goto(`${app.url}/login`)
  await appReady(page)
  await page.getByLabel('E-mail').fill(player.email)
  await page.getByLabel('Password').fill(demoPassword())
  await page.getByLabel('Password').press('Enter')
  await page.waitForURL(`${app.url}/`)
}

/** From the Drills page to the take form of the drill, through the links a player follows. */
async function openTakeForm(page: Page) {
  await page.goto(`${app.url}/drills`)
  await page.getByRole('link', { name: drill.title, exact: true }).click()
  await page.waitForURL(`${app.url}/drills/${drill.id}`)
  const record = page.getByTestId('record-link')
  expect(await record.textContent()).toContain(PART)
  await record.click()
  await page.waitForURL(/\/takes\/new\?/)
  const url = new URL(page.url())
  expect(url.searchParams.get('drillId')).toBe(String(drill.id))
  expect(url.searchParams.get('part')).toBe(PART)
  // The player's section is preselected.
  expect(await page.getByLabel('Part').inputValue()).toBe(PART)
  // With two open assignments of this drill and part the player says which one the take answers.
  const choice = page.getByTestId('take-assignment-choice')
  if (drill.open.length > 1) await choice.getByRole('radio').first().check()
  else expect(await choice.count()).toBe(0)
  // The radio is visually hidden inside its label, which takes the click as for any user.
  const upload = page.getByRole('radio', { name: 'Upload a file' })
  await page.locator('label', { has: upload }).click()
  expect(await upload.isChecked()).toBe(true)
}

async function takeCount(): Promise<number> {
  const r = await app.fetch('/api/takes?player=me&pageSize=100', { cookie: player.cookie })
  expect(r.status).toBe(200)
  return (await r.json() as TakeList).total
}

/** Every value of `data-status` the take page's live status panel shows, recorded as it changes. */
async function recordStatusPanel(page: Page) {
  await page.addInitScript(() => {
    const seen: string[] = []
    ;(window as any).__statusSeen = seen
    const note = () => {
      for (const el of document.querySelectorAll('section[data-status]')) {
        if (!el.querySelector('[role="status"][aria-live="polite"]')) continue
        const s = el.getAttribute('data-status') ?? ''
        if (seen.at(-1) !== s) seen.push(s)
      }
    }
    new MutationObserver(note).observe(document, { subtree: true, childList: true, attributes: true, attributeFilter: ['data-status'] })
  })
  return () => page.evaluate(() => [...((window as any).__statusSeen as string[])])
}

/** The signed number of a cents figure as the page writes it ("+8.1 ¢", "−0.4 ¢", "8.0 ¢"). */
function parseCents(text: string | null): number {
  const m = (text ?? '').match(/([+\u2212-]?)(\d+(?:\.\d+)?)\s*¢/)
  if (!m) throw new Error(`no cents figure in ${JSON.stringify(text)}`)
  return (m[1] === '\u2212' || m[1] === '-' ? -1 : 1) * Number(m[2])
}

describe('a player sends a take through the browser', () => {
  it('uploads a WAV, watches the status and reads a report that matches the synthesised truth', { timeout: 300_000 }, async () => {
    // Targets from the tuning engine itself (not from the app's pages or API answers).
    const targets = computeTargets(drill.document)
    const spb = 60 / drill.document.tempo
    const notes = targets.chords.flatMap((c) => {
      const n = c.notes.find(x => x.part === PART)
      return n ? [{ ...n, startS: LEAD_IN_S + c.startBeat * spb, endS: LEAD_IN_S + (c.startBeat + c.beats) * spb }] : []
    })
    expect(notes.length).toBeGreaterThan(1)
    const spec: SynthSpec = {
      sampleRate: SAMPLE_RATE,
      durationS: notes.at(-1)!.endS + 0.6,
      timbre: 'voice-alto',
      seed: 23,
      snrDb: 35,
      holds: notes.map(n => ({ startS: n.startS + 0.05, endS: n.endS - 0.15, hz: n.targetHz * 2 ** (SHARP_CENTS / 1200) })),
    }
    const { samples, holds: truth } = synthTakeWithTruth(spec)
    const wav = encodeWav(samples, SAMPLE_RATE)
    // The truth of each hold: the synthesised centre (server/analysis/synth.ts) in cents from the
    // engine's target. It is the chosen +8 ¢ up to what the settling transient leaves in the window.
    const expected = truth.map((t, i) => cents(notes[i]!.targetHz, t.centreHz))
    for (const e of expected) expect(Math.abs(e - SHARP_CENTS)).toBeLessThan(0.5)

    const before = await takeCount()
    const page = await newPage()
    const statusSeen = await recordStatusPanel(page)
    await signIn(page)
    await openTakeForm(page)

    const uploader = page.getByTestId('take-uploader')
    await uploader.locator('input[type="file"]').setInputFiles({ name: 'alto-take.wav', mimeType: 'audio/wav', buffer: Buffer.from(wav) })
    expect(await uploader.getByTestId('chosen-file').textContent()).toContain('alto-take.wav')
    await uploader.getByRole('button', { name: 'Send take' }).click()
    await page.waitForURL(/\/takes\/\d+$/, { timeout: 90_000 })
    const takeId = Number(new URL(page.url()).pathname.split('/').at(-1))

    // The take waits (nobody analyses it yet): the live status region says so, politely.
    const panel = page.locator('section[data-status="queued"]')
    await panel.waitFor()
    const region = panel.getByRole('status')
    expect(await region.getAttribute('aria-live')).toBe('polite')
    expect((await region.getByTestId('status-label').textContent())?.trim()).toBeTruthy()
    expect(await panel.getByText('This updates by itself.').isVisible()).toBe(true) // followed live
    expect((await (await app.fetch(`/api/takes/${takeId}`, { cookie: player.cookie })).json() as any).status).toBe('queued')

    // A worker starts elsewhere; the page follows the take to its report without a reload.
    analyser = await startApp({ dir: app.dir, seed: false, env: { NUXT_ANALYSIS_WORKERS: '1' } })
    const table = page.getByTestId('hold-table')
    await table.waitFor({ timeout: 240_000 })
    const seen = await statusSeen()
    // Only forward, and never failed (analysing may pass too quickly to be seen; "analysed" shows
    // in the panel for the moment until the report has loaded).
    const order = ['queued', 'analysing', 'analysed']
    expect(seen[0], JSON.stringify(seen)).toBe('queued')
    expect(seen.every(s => order.includes(s)), JSON.stringify(seen)).toBe(true)
    expect(seen.every((s, i) => i === 0 || order.indexOf(s) >= order.indexOf(seen[i - 1]!)), JSON.stringify(seen)).toBe(true)
    // … and is gone now that the take is analysed.
    expect(await page.locator('section[data-status]').count()).toBe(0)
    const api = await (await app.fetch(`/api/takes/${takeId}`, { cookie: player.cookie })).json() as any
    expect(api.status).toBe('analysed')
    expect(await takeCount()).toBe(before + 1)
    // Sent from the drill page, it still counts for the open assignment of that drill and part.
    expect(api.assignmentId).toBe(drill.open[0]?.id ?? null)

    // The hold table: one row per hold, in the drill's order.
    const headers = (await table.locator('thead th').allTextContents()).map(t => t.trim())
    const col = (name: string) => {
      const i = headers.indexOf(name)
      if (i < 0) throw new Error(`no "${name}" column in ${JSON.stringify(headers)}`)
      return i
    }
    const rows = table.locator('tbody tr')
    expect(await rows.count()).toBe(notes.length)
    for (let i = 0; i < notes.length; i++) {
      const cells = rows.nth(i).locator(':scope > th, :scope > td')
      // Target as the tuning engine computes it (Hz to two decimals, as the table writes it).
      expect(await cells.nth(col('Target')).textContent()).toContain(`${notes[i]!.targetHz.toFixed(2)} Hz`)
      // Measured against the synthesised truth: the engine is sub-cent accurate on clean tones.
      const shown = parseCents(await cells.nth(col('From target')).textContent())
      expect(Math.abs(shown - expected[i]!), `hold ${i + 1}: page ${shown} ¢, truth ${expected[i]!.toFixed(2)} ¢`).toBeLessThanOrEqual(1)
      expect(shown).toBeGreaterThan(0) // sharp, as sung
    }

    // The summary: every hold found, mean deviation the truth's mean (all holds sharp, so |x| = x).
    const truthMean = expected.reduce((s, e) => s + Math.abs(e), 0) / expected.length
    const mean = parseCents(await page.getByTestId('summary-mean').textContent())
    expect(Math.abs(mean - truthMean), `mean ${mean} ¢, truth ${truthMean.toFixed(2)} ¢`).toBeLessThanOrEqual(1)
    expect(Math.abs(mean - SHARP_CENTS)).toBeLessThanOrEqual(1)
    expect((await page.getByTestId('summary-found').textContent())?.replace(/\s+/g, ' ')).toContain(`${notes.length} of ${notes.length}`)
    await page.context().close()
  })

  it('a file that is not audio gets a clear message on the page and makes no take', { timeout: 180_000 }, async () => {
    const before = await takeCount()
    const text = Buffer.from('Rehearsal notes: hold the third low.\n'.repeat(200))
    const page = await newPage()
    await signIn(page)
    await openTakeForm(page)
    const uploader = page.getByTestId('take-uploader')
    const input = uploader.locator('input[type="file"]')
    let posts = 0
    page.on('request', (r) => { if (r.method() === 'POST' && new URL(r.url()).pathname === '/api/takes') posts++ })

    // A text file by its name and type: the form says so before sending anything.
    await input.setInputFiles({ name: 'notes.txt', mimeType: 'text/plain', buffer: text })
    const fieldError = uploader.locator('.field-error[role="alert"]')
    await fieldError.waitFor()
    expect(await fieldError.textContent()).toMatch(/not audio/i)
    await uploader.getByRole('button', { name: 'Send take' }).click()
    expect(await fieldError.textContent()).toMatch(/not audio/i)

    // The same text under an audio name: the server sniffs the bytes and refuses (415 not_audio);
    // the page shows its message and keeps the file so nothing is lost.
    await input.setInputFiles({ name: 'take.wav', mimeType: 'audio/wav', buffer: text })
    await fieldError.waitFor({ state: 'detached' })
    const sent = page.waitForResponse(r => r.url().endsWith('/api/takes') && r.request().method() === 'POST')
    await uploader.getByRole('button', { name: 'Send take' }).click()
    const res = await sent
    expect(res.status()).toBe(415)
    expect((await res.json()).data.code).toBe('not_audio')
    const error = page.getByTestId('upload-error')
    await error.waitFor()
    expect(await error.getAttribute('role')).toBe('alert')
    const message = (await error.textContent()) ?? ''
    expect(message).toMatch(/not sent/i)
    expect(message).toMatch(/not audio/i)
    expect(message).toMatch(/WAV/)
    expect(await uploader.getByTestId('chosen-file').textContent()).toContain('take.wav')
    expect(await uploader.getByRole('button', { name: 'Send again' }).isEnabled()).toBe(true)
    expect(page.url()).toContain('/takes/new')

    // Only the second file went to the server, and neither made a take.
    expect(posts).toBe(1)
    expect(await takeCount()).toBe(before)
    await page.context().close()
  })
})
