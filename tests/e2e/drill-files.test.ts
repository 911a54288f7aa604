// Drill files through the built app: MusicXML, compressed MusicXML and MIDI imported (with a
// preview that saves nothing), exported and imported again; bad files refused with a message
// naming the place and nothing saved; and a director previewing, matching parts to sections and
// reading the notation on a 390-px phone in Chromium.
import { readFileSync } from 'node:fs'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser } from 'playwright-core'
import pkg from '@tonejs/midi'
import { appReady, demoPassword, launchBrowser, startApp, type App } from './harness'
import { dbQuery, ensembleId } from './takes-helpers'

const { Midi } = pkg
const SCORES = join(import.meta.dirname, '../fixtures/musicxml')
const score = (name: string) => new Uint8Array(readFileSync(join(SCORES, name)))

let app: App
let browser: Browser | undefined
let director: string
let player: string
let outsider: string
let choir: number

function form (file: { bytes: Uint8Array | string, name: string }, fields: Record<string, string> = {}): FormData {
  const f = new FormData()
  for (const [k, v] of Object.entries(fields)) f.append(k, v)
  f.append('file', new Blob([file.bytes as BlobPart]), file.name)
  return f
}
const post = (cookie: string, body: FormData, ensemble = choir) => app.fetch(`/api/ensembles/${ensemble}/drills/import`, { method: 'POST', cookie, body })
const drillCount = () => dbQuery<{ n: number }>(app, 'select count(*) as n from drills')[0]!.n

beforeAll(async () => {
  app = await startApp()
  director = await app.login('helena.marsh@example.org')
  player = await app.login('clara.lindqvist@example.org')
  outsider = await app.login('marcus.doyle@example.org') // plays in the brass band only
  choir = await ensembleId(app, director, /Choir/)
})

afterAll(async () => {
  await browser?.close()
  await app?.stop()
})

describe('drill import', () => {
  it('previews a closed-score hymn without saving it: one part per voice, the sections to match them to', async () => {
    const before = drillCount()
    const r = await post(director, form({ bytes: score('closed-score-hymn.musicxml'), name: 'hymn.musicxml' }, { preview: '1' }))
    expect(r.status).toBe(200)
    const body = await r.json() as any
    // Worked out by hand from the fixture (see its header comment).
    expect(body).toMatchObject({ preview: true, format: 'musicxml', parts: ['Soprano', 'Alto', 'Tenor', 'Bass'], chords: 6, warnings: [] })
    expect(body.drill.chords.map((c: any) => c.beats)).toEqual([2, 2, 1, 1, 4, 2])
    expect(body.sections).toEqual(expect.arrayContaining(['Soprano', 'Alto', 'Tenor', 'Bass']))
    expect(drillCount()).toBe(before)
  })

  it('imports a compressed .mxl, a bar range of it, renaming parts to sections', async () => {
    const r = await post(director, form({ bytes: score('closed-score-hymn.mxl'), name: 'hymn.mxl' }, { bars: '3-3', title: 'Hymn, last bar', parts: JSON.stringify({ Soprano: 'Alto', Alto: 'Soprano' }) }))
    expect(r.status).toBe(201)
    const body = await r.json() as any
    expect(body).toEqual({ id: expect.any(Number), parts: ['Alto', 'Soprano', 'Tenor', 'Bass'], chords: 2, warnings: [] })
    const d = await (await app.fetch(`/api/drills/${body.id}`, { cookie: director })).json() as any
    expect(d.document.title).toBe('Hymn, last bar')
    expect(d.document.chords.map((c: any) => c.notes.Alto)).toEqual(['C5', 'D5']) // the top voice, renamed
  })

  it('reads transposing parts at concert pitch and says where voices cross', async () => {
    const band = await post(director, form({ bytes: score('transposing-band.musicxml'), name: 'trio.musicxml' }))
    expect(band.status).toBe(201)
    const d = await (await app.fetch(`/api/drills/${(await band.json() as any).id}`, { cookie: director })).json() as any
    // B-flat trumpet written C5 sounds B-flat 4; E-flat alto saxophone written E5 sounds G4 (common practice).
    expect(d.document.chords[0].notes).toEqual({ 'Trumpet': 'Bb4', 'Alto Saxophone': 'G4', 'Trombone': 'Eb3' })
    expect(d.document.parts.map((p: any) => p.instrument ?? null)).toEqual(['trumpet-bb', 'alto-sax-eb', null])
    const crossing = await post(director, form({ bytes: score('crossing-voices.musicxml'), name: 'crossing.musicxml' }))
    expect(crossing.status).toBe(201)
    expect((await crossing.json() as any).warnings).toContain('Bar 6: Alto goes above Soprano (the voices cross); each part keeps its own voice as written')
  })

  it('refuses bad files with a clear message naming the place, and saves nothing', async () => {
    const before = drillCount()
    const emptyMidi = new Midi()
    emptyMidi.addTrack().name = 'Nothing'
    const cases: [FormData, number, string, RegExp][] = [
      [form({ bytes: '<score-partwise>\n<part-list>\n</score-partwise>', name: 'broken.musicxml' }), 400, 'not_xml', /not well-formed XML: line \d/],
      [form({ bytes: '<score-partwise><part-list/><part id="P1"><measure number="1"><note><rest/><duration>4</duration></note></measure></part></score-partwise>', name: 'rests.musicxml' }), 400, 'no_pitched_notes', /no pitched notes/],
      [form({ bytes: new Uint8Array(emptyMidi.toArray()), name: 'empty.mid' }), 400, 'midi_no_tracks', /no note events/],
      [form({ bytes: score('crossing-voices.musicxml'), name: 'c.musicxml' }, { bars: '1-2' }), 400, 'invalid_bars', /Bar 1 is not in this score/],
      [form({ bytes: score('crossing-voices.musicxml'), name: 'c.musicxml' }, { parts: JSON.stringify({ Soprano: 'Alto' }) }), 400, 'invalid_part_names', /Two parts would both be named "Alto"/],
      [form({ bytes: score('crossing-voices.musicxml'), name: 'c.musicxml' }, { bars: 'all' }), 400, 'invalid_input', /Bars as a range/],
      [form({ bytes: new Uint8Array([0, 1, 2, 3]), name: 'x.bin' }), 415, 'not_a_drill', /not a drill file/],
    ]
    for (const [body, status, code, message] of cases) {
      const r = await post(director, body)
      const err = await r.json() as any
      expect(r.status, code).toBe(status)
      expect(err.data.code).toBe(code)
      const text = [err.data.message, ...(err.data.issues ?? []).map((i: any) => i.message)].join(' ')
      expect(text).toMatch(message)
      expect(text).not.toMatch(/undefined|\[object Object\]|at .*\.(ts|js|mjs):\d/)
    }
    expect(drillCount()).toBe(before)
  })

  it('only directors import; a player is refused before the file is read', async () => {
    expect((await post(player, form({ bytes: score('closed-score-hymn.musicxml'), name: 'h.musicxml' }, { preview: '1' }))).status).toBe(403)
  })
})

describe('drill export', () => {
  let id: number
  beforeAll(async () => {
    const r = await post(director, form({ bytes: score('closed-score-hymn.musicxml'), name: 'hymn.musicxml' }))
    id = (await r.json() as any).id
  })

  it.each([
    // The registered media type of uncompressed MusicXML (MusicXML 4.0); MIDI's audio/midi (common practice).
    ['musicxml', 'application/vnd.recordare.musicxml+xml', 'Harbour Evening.musicxml'],
    ['midi', 'audio/midi', 'Harbour Evening.mid'],
    ['json', 'application/json', 'Harbour Evening.json'],
  ])('%s: the file with its content type and name, which imports back to the same drill', async (format, type, name) => {
    const r = await app.fetch(`/api/drills/${id}/export?format=${format}`, { cookie: player })
    expect(r.status).toBe(200)
    expect(r.headers.get('content-type')).toContain(type)
    expect(r.headers.get('content-disposition')).toContain(`filename="${name}"`)
    const bytes = new Uint8Array(await r.arrayBuffer())
    const again = await post(director, form({ bytes, name }))
    expect(again.status).toBe(201)
    const original = await (await app.fetch(`/api/drills/${id}`, { cookie: director })).json() as any
    const copy = await (await app.fetch(`/api/drills/${(await again.json() as any).id}`, { cookie: director })).json() as any
    expect(copy.document).toEqual(original.document)
  })

  it('a MIDI import takes its title from the title field, else the file name', async () => {
    const midi = new Uint8Array(await (await app.fetch(`/api/drills/${id}/export?format=midi`, { cookie: director })).arrayBuffer())
    const named = await (await post(director, form({ bytes: midi, name: 'Tuesday warm-up.mid' }), choir)).json() as any
    expect((await (await app.fetch(`/api/drills/${named.id}`, { cookie: director })).json() as any).document.title).toBe('Tuesday warm-up')
    const titled = await (await post(director, form({ bytes: midi, name: 'x.mid' }, { title: 'Chorale 4' }))).json() as any
    expect((await (await app.fetch(`/api/drills/${titled.id}`, { cookie: director })).json() as any).document.title).toBe('Chorale 4')
  })

  it('refuses an unknown format, and another ensemble\'s drill is not found', async () => {
    expect((await app.fetch(`/api/drills/${id}/export?format=pdf`, { cookie: director })).status).toBe(400)
    expect((await app.fetch(`/api/drills/${id}/export?format=musicxml`, { cookie: outsider })).status).toBe(404)
  })
})

describe('in the browser, on a phone', () => {
  it('a director previews a score, sees it as notation, saves it with its parts as sections and switches to written pitch', async () => {
    browser = await launchBrowser()
    const context = await browser.newContext({ viewport: { width: 390, height: 844 } })
    const page = await context.newPage()
    page.setDefaultTimeout(60_000)
    page.setDefaultNavigationTimeout(90_000)
    const pageWidth = () => page.evaluate(() => document.documentElement.scrollWidth)
    await page.goto(`${app.url}/login`)
    await appReady(page)
    await page.getByLabel('E-mail').fill('helena.marsh@example.org')
    await page.getByLabel('Password').fill(demoPassword())
    await page.getByLabel('Password').press('Enter')
    await page.waitForURL(`${app.url}/`)

    await page.goto(`${app.url}/drills`)
    // The page reacts to a chosen file only once the app has taken over the server-rendered page.
    await page.waitForFunction(() => !!(document.querySelector('#__nuxt') as any)?.__vue_app__)
    await page.locator('input[type="file"]').setInputFiles(join(SCORES, 'chord-notes-divisi.musicxml'))
    await page.getByText('chord-notes-divisi.musicxml').waitFor()
    await page.getByLabel('Title (optional)').fill('Phone import')
    await page.getByRole('button', { name: 'Preview' }).click()
    const preview = page.getByTestId('import-preview')
    await preview.waitFor()
    await expect.poll(() => page.evaluate(() => document.activeElement?.textContent?.trim())).toMatch(/^Preview: Phone import/)
    expect(await preview.textContent()).toContain('"Men" divides into 2 notes')
    // The notation library drew the score.
    await page.locator('[data-testid="drill-notation"][data-state="ready"] svg').first().waitFor()
    expect(await pageWidth()).toBeLessThanOrEqual(390)

    await page.getByLabel('Save Women 1 as').selectOption('Soprano')
    await page.getByLabel('Save Women 2 as').selectOption('Alto')
    await page.getByLabel('Save Men 1 as').selectOption('Tenor')
    await page.getByLabel('Save Men 2 as').selectOption('Bass')
    await page.getByRole('button', { name: 'Save this drill' }).click()
    await page.getByText('Drill imported').waitFor()
    expect(await page.getByRole('status').filter({ hasText: 'Drill imported' }).textContent()).toContain('parts Soprano, Alto, Tenor, Bass')
    await page.getByRole('link', { name: 'Open the drill' }).click()
    await page.waitForURL(/\/drills\/\d+$/)

    await page.locator('[data-testid="drill-notation"][data-state="ready"] svg').first().waitFor()
    const written = page.getByRole('radio', { name: 'Written pitch' })
    await page.locator('label').filter({ has: written }).click()
    expect(await written.isChecked()).toBe(true)
    await page.locator('[data-testid="drill-notation"][data-state="ready"] svg').first().waitFor()
    await page.getByText('Download the drill').click()
    const href = await page.getByRole('link', { name: 'MIDI', exact: true }).getAttribute('href')
    expect(href).toMatch(/\/api\/drills\/\d+\/export\?format=midi$/)
    expect(await pageWidth()).toBeLessThanOrEqual(390)
    await context.close()
  })
})
