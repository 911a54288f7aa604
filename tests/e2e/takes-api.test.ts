// Takes end to end against the built app: upload WAV and Opus takes and read the report, live
// progress, idempotent submits, refusals (not audio, another ensemble's drill, a wrong part),
// analysis failures that keep the upload, re-scoring from the stored measurement, audio with
// Range requests to the right people only, and withdraw/restore.
import { mkdirSync, mkdtempSync, readFileSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { randomUUID } from 'node:crypto'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { startApp, type App } from './harness'
import {
  FIXTURES, TRIAD_MIDI, cents, dbQuery, ensembleId, equalHz, filesUnder, importDrill, postTake, readEvents,
  retryStaleSockets, sameBytes, storedObjects, triadDrill, triadTake, waitForTake,
} from './takes-helpers'
import { encodeWav } from '../../server/analysis/wav'

let app: App
let tmp: string
let director: string // choir director
let clara: string // choir soprano player
let aisha: string // choir soprano section leader
let priya: string // choir alto section leader
let marcus: string // brass player, not in the choir
let choir: number
let drillId: number

let dir: string

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'driftline-e2e-takes-'))
  // A temp folder of the app's own: uploads must leave nothing in it.
  tmp = join(dir, 'tmp')
  mkdirSync(tmp, { recursive: true })
  app = retryStaleSockets(await startApp({ dir, env: { TMPDIR: tmp } }))
  director = await app.login('helena.marsh@example.org')
  clara = await app.login('clara.lindqvist@example.org')
  aisha = await app.login('aisha.bello@example.org')
  priya = await app.login('priya.natarajan@example.org')
  marcus = await app.login('marcus.doyle@example.org')
  choir = await ensembleId(app, director, /Choir/)
  drillId = await importDrill(app, director, choir, triadDrill())
})

afterAll(async () => {
  await app?.stop()
  if (dir) rmSync(dir, { recursive: true, force: true })
})

describe('a WAV take', () => {
  // Offsets the synthesised singer sings at, in cents from equal temperament.
  const offsets = [0, 6, -9]
  let takeId: number
  let wav: Uint8Array
  let truth: number[]
  let report: any

  it('is accepted with 202 and analysed into a report of the CLI shape', async () => {
    ({ wav, truth } = triadTake(offsets))
    const r = await postTake(app, clara, { drillId, part: 'Soprano', audio: wav, name: 'my take.wav' })
    expect(r.status).toBe(202)
    expect(r.body).toEqual({ id: expect.any(Number), status: 'queued' })
    takeId = r.body.id
    const t = await waitForTake(app, clara, takeId)
    expect(t.status, JSON.stringify(t.error)).toBe('analysed')
    expect(t.error).toBeNull()
    expect(t.progress).toBe(1)
    report = t.report
    expect(report.take).toEqual({ durationS: expect.any(Number), sampleRate: 44100, channels: 1 })
    expect(report.part).toBe('Soprano')
    expect(report.a4).toBe(440)
    expect(Object.keys(report.summary)).toEqual(expect.arrayContaining(['meanAbsCents', 'withinToleranceShare', 'driftCentsPerMin', 'holdsFound', 'holdsExpected']))
    expect(report.summary.holdsFound).toBe(3)
    expect(report.summary.holdsExpected).toBe(3)
    for (const h of report.holds) {
      expect(Object.keys(h)).toEqual(expect.arrayContaining(['index', 'note', 'member', 'startS', 'endS', 'targetHz', 'detectedHz',
        'centsFromTarget', 'centsFromEqual', 'spreadCents', 'slopeCentsPerS', 'confidence', 'withinTolerance', 'reason']))
    }
    expect(t.drill).toEqual({ id: drillId, title: 'E2E triad' })
    expect(t.part).toBe('Soprano')
    expect(t.player.name).toBe('Clara Lindqvist')
    expect(t.audioUrl).toBe(`/takes/${takeId}/audio`)
    expect(t.mime).toBe('audio/wav')
    expect(t.canWithdraw).toBe(true)
    expect(t.canRestore).toBe(false)
  })

  it('measures each hold against the synthesiser\'s truth and scores it against equal temperament', () => {
    report.holds.forEach((h: any, i: number) => {
      // Equal-tempered target 440·2^((n−69)/12) (12-TET, A4 = 440 Hz; common practice).
      expect(h.targetHz).toBeCloseTo(equalHz(TRIAD_MIDI[i]!), 3)
      // Truth: the synthesised hold's centre (server/analysis/synth.ts); the engine is checked to
      // sub-cent precision by its own benchmark, so a cent here is a wide margin for the e2e path.
      expect(Math.abs(cents(truth[i]!, h.detectedHz))).toBeLessThan(1)
      expect(h.centsFromTarget).toBeCloseTo(cents(equalHz(TRIAD_MIDI[i]!), truth[i]!), 0)
      expect(h.withinTolerance).toBe(Math.abs(h.centsFromTarget) <= 10)
    })
    expect(report.holds.map((h: any) => h.member)).toEqual(['root', 'third', 'fifth'])
  })

  it('keeps the original under an opaque key, never one made from the file name', () => {
    const [t] = dbQuery(app, 'select object_key, original_name, bytes, mime from takes where id = ?', takeId)
    expect(t.object_key).toMatch(/^takes\/[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/)
    expect(t).toMatchObject({ original_name: 'my take.wav', bytes: wav.length, mime: 'audio/wav' })
  })

  it('stores the analysis, one row per hold, and the job as done', () => {
    const [a] = dbQuery(app, 'select * from analyses where take_id = ? and is_current = 1', takeId)
    expect(a.system_name).toBe('equal')
    expect(JSON.parse(a.measurement).holds).toHaveLength(3)
    const holds = dbQuery(app, 'select * from hold_results where analysis_id = ? order by hold_index', a.id)
    expect(holds.map(h => h.note)).toEqual(['A4', 'C#5', 'E5'])
    expect(holds[1].detected_hz).toBeCloseTo(report.holds[1].detectedHz, 6)
    const jobs = dbQuery(app, 'select status, attempts from jobs where take_id = ?', takeId)
    expect(jobs).toEqual([{ status: 'done', attempts: 1 }])
  })

  it('re-scores against just intonation from the stored measurement, without decoding again', async () => {
    const jobsBefore = dbQuery(app, 'select count(*) as n from jobs where take_id = ?', takeId)[0].n
    const analysesBefore = dbQuery(app, 'select count(*) as n from analyses where take_id = ?', takeId)[0].n
    const r = await app.fetch(`/api/takes/${takeId}/rescore`, {
      method: 'POST', cookie: clara, headers: { 'content-type': 'application/json' },
      body: JSON.stringify({ system: { name: 'just-root' } }),
    })
    expect(r.status).toBe(200)
    const { report: just } = await r.json() as any
    expect(just.system).toBe('just-root')
    // Pure major third 5/4 and fifth 3/2 above the root A4 = 440 Hz: 550 Hz and 660 Hz (common practice).
    expect(just.holds.map((h: any) => h.targetHz)).toEqual([expect.closeTo(440, 6), expect.closeTo(550, 6), expect.closeTo(660, 6)])
    // Same measured pitches: only the targets moved.
    just.holds.forEach((h: any, i: number) => {
      expect(h.detectedHz).toBe(report.holds[i].detectedHz)
      expect(h.centsFromTarget).toBeCloseTo(cents(h.targetHz, h.detectedHz), 2)
    })
    // The 5/4 third lies 13.69 ¢ below the equal-tempered one (1200·log2(5/4) = 386.31 ¢; common practice).
    expect(just.holds[1].centsFromTarget - report.holds[1].centsFromTarget).toBeCloseTo(13.686, 2)
    // No new job (nothing decoded) and the stored analysis is unchanged.
    expect(dbQuery(app, 'select count(*) as n from jobs where take_id = ?', takeId)[0].n).toBe(jobsBefore)
    expect(dbQuery(app, 'select count(*) as n from analyses where take_id = ?', takeId)[0].n).toBe(analysesBefore)
  })

  it('refuses a re-score with an invalid system (400 with issues)', async () => {
    const r = await app.fetch(`/api/takes/${takeId}/rescore`, {
      method: 'POST', cookie: clara, headers: { 'content-type': 'application/json' },
      body: JSON.stringify({ system: { name: 'nonsense' } }),
    })
    expect(r.status).toBe(400)
    expect((await r.json() as any).data.code).toBe('invalid_input')
  })

  it('streams the original with Range requests (206) to the people allowed to hear it', async () => {
    const whole = await app.fetch(`/takes/${takeId}/audio`, { cookie: clara })
    expect(whole.status).toBe(200)
    expect(whole.headers.get('accept-ranges')).toBe('bytes')
    expect(sameBytes(await whole.arrayBuffer(), wav)).toBe(true)

    const part = await app.fetch(`/takes/${takeId}/audio`, { cookie: clara, headers: { range: 'bytes=100-1099' } })
    expect(part.status).toBe(206)
    expect(part.headers.get('content-range')).toBe(`bytes 100-1099/${wav.length}`)
    expect(sameBytes(await part.arrayBuffer(), wav.subarray(100, 1100))).toBe(true)

    const tail = await app.fetch(`/takes/${takeId}/audio`, { cookie: director, headers: { range: 'bytes=-10' } })
    expect(tail.status).toBe(206)
    expect(sameBytes(await tail.arrayBuffer(), wav.subarray(wav.length - 10))).toBe(true)

    const beyond = await app.fetch(`/takes/${takeId}/audio`, { cookie: clara, headers: { range: `bytes=${wav.length + 10}-` } })
    expect(beyond.status).toBe(416)

    // Her section leader hears it; another section's leader, a non-member and nobody do not.
    expect((await app.fetch(`/takes/${takeId}/audio`, { cookie: aisha, headers: { range: 'bytes=0-9' } })).status).toBe(206)
    expect((await app.fetch(`/takes/${takeId}/audio`, { cookie: priya })).status).toBe(404)
    expect((await app.fetch(`/takes/${takeId}/audio`, { cookie: marcus })).status).toBe(404)
    expect((await app.fetch(`/takes/${takeId}/audio`)).status).toBe(404)
    expect((await app.fetch(`/api/takes/${takeId}`, { cookie: marcus })).status).toBe(404)
  })

  it('is withdrawn by the player (hidden from the section leader, kept for the director) and restored by the director', async () => {
    const post = (path: string, cookie: string) => app.fetch(path, { method: 'POST', cookie })
    expect((await post(`/api/takes/${takeId}/withdraw`, aisha)).status).toBe(403)
    const w = await post(`/api/takes/${takeId}/withdraw`, clara)
    expect(w.status).toBe(200)
    expect((await post(`/api/takes/${takeId}/withdraw`, clara)).status).toBe(409)
    expect((await app.fetch(`/api/takes/${takeId}`, { cookie: aisha })).status).toBe(404)
    expect((await app.fetch(`/takes/${takeId}/audio`, { cookie: aisha })).status).toBe(404)
    const seen = await (await app.fetch(`/api/takes/${takeId}`, { cookie: director })).json() as any
    expect(seen.withdrawnAt).toEqual(expect.any(String))
    expect(seen.canRestore).toBe(true)
    const list = await (await app.fetch(`/api/takes?drillId=${drillId}`, { cookie: director })).json() as any
    expect(list.items.find((i: any) => i.id === takeId)?.withdrawn).toBe(true)
    // The director's list of withdrawn takes offers the restore; the player's own does not.
    const withdrawn = await (await app.fetch('/api/takes?withdrawn=only&pageSize=100', { cookie: director })).json() as any
    expect(withdrawn.items.find((i: any) => i.id === takeId)).toMatchObject({ withdrawn: true, withdrawnAt: expect.any(String), canRestore: true })
    expect(withdrawn.items.every((i: any) => i.withdrawn)).toBe(true)
    const own = await (await app.fetch('/api/takes?withdrawn=only&player=me', { cookie: clara })).json() as any
    expect(own.items.find((i: any) => i.id === takeId)?.canRestore).toBe(false)

    expect((await post(`/api/takes/${takeId}/restore`, clara)).status).toBe(403)
    expect((await post(`/api/takes/${takeId}/restore`, director)).status).toBe(200)
    expect((await post(`/api/takes/${takeId}/restore`, director)).status).toBe(409)
    expect((await app.fetch(`/api/takes/${takeId}`, { cookie: aisha })).status).toBe(200)
    const after = await (await app.fetch('/api/takes?withdrawn=only&pageSize=100', { cookie: director })).json() as any
    expect(after.items.some((i: any) => i.id === takeId)).toBe(false)
  })

  it('tells the reader whether they are the player, and names the player', async () => {
    const mine = await (await app.fetch(`/api/takes/${takeId}`, { cookie: clara })).json() as any
    expect(mine).toMatchObject({ viewerIsPlayer: true, player: { name: 'Clara Lindqvist' } })
    const theirs = await (await app.fetch(`/api/takes/${takeId}`, { cookie: director })).json() as any
    expect(theirs).toMatchObject({ viewerIsPlayer: false, player: { name: 'Clara Lindqvist' } })
  })

  it('lists the player\'s takes with figures, paginated', async () => {
    const r = await app.fetch(`/api/takes?player=me&drillId=${drillId}&page=1&pageSize=1`, { cookie: clara })
    expect(r.status).toBe(200)
    const page = await r.json() as any
    expect(page.page).toBe(1)
    expect(page.pageSize).toBe(1)
    expect(page.total).toBeGreaterThanOrEqual(1)
    expect(page.items).toHaveLength(1)
    const mine = (await (await app.fetch(`/api/takes?player=me&drillId=${drillId}&pageSize=100`, { cookie: clara })).json() as any).items.find((i: any) => i.id === takeId)
    expect(mine).toMatchObject({ drillId, drillTitle: 'E2E triad', part: 'Soprano', playerName: 'Clara Lindqvist', status: 'analysed', withdrawn: false })
    expect(mine.meanAbsCents).toBeCloseTo(report.summary.meanAbsCents, 6)
    expect((await app.fetch('/api/takes?pageSize=1000', { cookie: clara })).status).toBe(400)
  })
})

describe('Opus takes (what browsers record)', () => {
  // Fixtures made by scripts/make-audio-fixtures.ts: a 1-s 440 Hz sine encoded by opusenc in Ogg,
  // and the same Opus packets in the WebM layout a browser recorder streams.
  const oneHold = {
    title: 'E2E one A', key: 'A major', tempo: 60, a4: 440, system: { name: 'equal' }, tolerance: 10,
    parts: [{ name: 'Soprano' }], chords: [{ beats: 1, notes: { Soprano: 'A4' } }],
  }
  it.each([
    ['Ogg Opus', 'opus-mono-48000-440.opus', 'audio/ogg; codecs=opus'],
    ['WebM Opus (recorder layout)', 'webm-recorder-opus-mono-48000-440.webm', 'audio/webm; codecs=opus'],
  ])('%s gets a report with the 440 Hz tone found', async (_label, file, mime) => {
    const id = await importDrill(app, director, choir, oneHold)
    const audio = new Uint8Array(readFileSync(join(FIXTURES, file)))
    const r = await postTake(app, clara, { drillId: id, part: 'Soprano', audio, name: 'recording.bin' })
    expect(r.status).toBe(202)
    const t = await waitForTake(app, clara, r.body.id)
    expect(t.status, JSON.stringify(t.error)).toBe('analysed')
    expect(t.mime).toBe(mime)
    expect(t.report.take.sampleRate).toBe(48000) // Opus always decodes at 48 kHz (RFC 6716)
    expect(t.report.holds).toHaveLength(1)
    // The fixture's source is a 440 Hz sine; a lossy codec keeps its pitch well inside a cent.
    expect(Math.abs(cents(440, t.report.holds[0].detectedHz))).toBeLessThan(1)
  })
})

describe('live progress', () => {
  it('sends status events until the take is analysed', async () => {
    const { wav } = triadTake([2, -3, 4], { seed: 11 })
    const r = await postTake(app, clara, { drillId, part: 'Soprano', audio: wav })
    expect(r.status).toBe(202)
    const res = await app.fetch(`/api/takes/${r.body.id}/events`, { cookie: clara })
    expect(res.status).toBe(200)
    expect(res.headers.get('content-type')).toContain('text/event-stream')
    const events = await readEvents(res)
    expect(events.length).toBeGreaterThanOrEqual(1)
    expect(events.every(([name]) => name === 'status')).toBe(true)
    const last = events.at(-1)![1]
    expect(last).toEqual({ status: 'analysed', progress: 1, error: null })
    const progress = events.map(([, d]) => d.progress)
    expect(progress).toEqual([...progress].sort((a, b) => a - b)) // never goes back
    expect((await app.fetch(`/api/takes/${r.body.id}/events`, { cookie: marcus })).status).toBe(404)
  })
})

describe('a second submit of the same form', () => {
  it('returns the first take (200) and makes no second one', async () => {
    const key = randomUUID()
    const { wav } = triadTake([1, 1, 1], { seed: 5 })
    const objectsBefore = storedObjects(app).length
    const first = await postTake(app, clara, { drillId, part: 'Soprano', audio: wav, idempotencyKey: key })
    expect(first.status).toBe(202)
    const second = await postTake(app, clara, { drillId, part: 'Soprano', audio: wav, idempotencyKey: key })
    expect(second.status).toBe(200)
    expect(second.body.id).toBe(first.body.id)
    expect(dbQuery(app, 'select count(*) as n from takes where idempotency_key = ?', key)[0].n).toBe(1)
    expect(storedObjects(app).length).toBe(objectsBefore + 1) // the repeat's upload was not kept
  })
})

describe('refused uploads', () => {
  const count = () => dbQuery(app, 'select count(*) as n from takes')[0].n as number

  it('not audio → 415 with a stable code, nothing stored', async () => {
    const before = [count(), storedObjects(app).length]
    // Text saved under an audio name: the type is sniffed from the bytes, never the name.
    const audio = new Uint8Array(readFileSync(join(FIXTURES, 'not-audio-text.wav')))
    const r = await postTake(app, clara, { drillId, part: 'Soprano', audio, name: 'take.wav', type: 'audio/wav' })
    expect(r.status).toBe(415)
    expect(r.body.data.code).toBe('not_audio')
    const noise = await postTake(app, clara, { drillId, part: 'Soprano', audio: new Uint8Array(readFileSync(join(FIXTURES, 'not-audio-noise.bin'))) })
    expect(noise.status).toBe(415)
    expect([count(), storedObjects(app).length]).toEqual(before)
  })

  it('a drill of another ensemble → 404, and the upload is not kept', async () => {
    const before = [count(), storedObjects(app).length]
    const { wav } = triadTake([0, 0, 0])
    const r = await postTake(app, marcus, { drillId, part: 'Soprano', audio: wav })
    expect(r.status).toBe(404)
    expect(r.body.data.code).toBe('drill_not_found')
    expect((await postTake(app, clara, { drillId: 999999, part: 'Soprano', audio: wav })).status).toBe(404)
    expect([count(), storedObjects(app).length]).toEqual(before)
  })

  it('text fields sent after the audio → 400 before anything is stored', async () => {
    const before = [count(), storedObjects(app).length]
    const { wav } = triadTake([0, 0, 0])
    const form = new FormData()
    form.append('audio', new Blob([new Uint8Array(wav)]), 'take.wav')
    form.append('drillId', String(drillId))
    form.append('part', 'Soprano')
    const r = await app.fetch('/api/takes', { method: 'POST', body: form, cookie: clara })
    expect(r.status).toBe(400)
    const body = await r.json() as any
    expect(body.data.code).toBe('invalid_input')
    expect(body.data.order).toBe('text fields before the audio file')
    expect([count(), storedObjects(app).length]).toEqual(before)
  })

  it('a part the drill does not have, or bad fields → 400; no session → 401', async () => {
    const { wav } = triadTake([0, 0, 0])
    const wrong = await postTake(app, clara, { drillId, part: 'Tuba', audio: wav })
    expect(wrong.status).toBe(400)
    expect(wrong.body.data.code).toBe('unknown_part')
    const bad = await postTake(app, clara, { drillId: 'abc', part: 'Soprano', audio: wav })
    expect(bad.status).toBe(400)
    expect(bad.body.data.issues[0].path).toEqual(['drillId'])
    const form = new FormData()
    form.append('drillId', String(drillId))
    form.append('part', 'Soprano')
    const noFile = await app.fetch('/api/takes', { method: 'POST', body: form, cookie: clara })
    expect(noFile.status).toBe(400)
    expect(((await noFile.json()) as any).data.code).toBe('missing_file')
    expect((await postTake(app, '', { drillId, part: 'Soprano', audio: wav })).status).toBe(401)
  })

  it('a second file after the audio → 400, and the stored audio is removed again', async () => {
    const before = [count(), storedObjects(app).length]
    const { wav } = triadTake([0, 0, 0])
    const form = new FormData()
    form.append('drillId', String(drillId))
    form.append('part', 'Soprano')
    form.append('audio', new Blob([new Uint8Array(wav)]), 'take.wav')
    form.append('extra', new Blob(['more']), 'extra.txt')
    const r = await app.fetch('/api/takes', { method: 'POST', body: form, cookie: clara })
    expect(r.status).toBe(400)
    expect(['too_many_files', 'unexpected_file']).toContain(((await r.json()) as any).data.code)
    expect([count(), storedObjects(app).length]).toEqual(before)
  })

  it('a WAV whose header states more than 20 minutes → 413 too_long at upload, nothing stored', async () => {
    const mine = async () => ((await (await app.fetch('/api/takes?player=me', { cookie: clara })).json()) as any).total as number
    const before = [count(), await mine(), storedObjects(app).length]
    // One second of audio behind a header that claims 21 minutes of 16-bit mono at 8 kHz: the
    // data chunk size (Microsoft RIFF/WAVE) divided by the byte rate is what the header states.
    const wav = encodeWav(new Float32Array(8000), 8000)
    const v = new DataView(wav.buffer, wav.byteOffset, wav.byteLength)
    v.setUint32(40, 21 * 60 * 8000 * 2, true) // the canonical 44-byte header has the data size at 40
    expect(String.fromCharCode(...wav.subarray(36, 40))).toBe('data')
    const r = await postTake(app, clara, { drillId, part: 'Soprano', audio: wav, name: 'long.wav' })
    expect(r.status).toBe(413)
    expect(r.body.data.code).toBe('too_long')
    expect(r.body.data).toMatchObject({ code: 'too_long', durationS: 1260, maxDurationS: 1200 })
    expect([count(), await mine(), storedObjects(app).length]).toEqual(before)
  })

  it('an empty file → 422 empty', async () => {
    const r = await postTake(app, clara, { drillId, part: 'Soprano', audio: new Uint8Array(0) })
    expect(r.status).toBe(422)
    expect(r.body.data.code).toBe('empty')
  })

  it('leaves no temp file behind', () => {
    expect(filesUnder(tmp)).toEqual([])
  })
})

describe('audio that cannot be scored', () => {
  it('fails the take with the engine\'s code and message; the upload is kept and can be heard', async () => {
    const silent = encodeWav(new Float32Array(44100 * 4), 44100)
    const r = await postTake(app, clara, { drillId, part: 'Soprano', audio: silent })
    expect(r.status).toBe(202)
    const t = await waitForTake(app, clara, r.body.id)
    expect(t.status).toBe('failed')
    expect(t.error).toEqual({ code: 'silent', message: expect.stringMatching(/silent/i) })
    expect(t.report).toBeNull()
    const audio = await app.fetch(`/takes/${r.body.id}/audio`, { cookie: clara })
    expect(audio.status).toBe(200)
    expect(sameBytes(await audio.arrayBuffer(), silent)).toBe(true)
    // Not retried: the audio will not change on a second try.
    expect(dbQuery(app, 'select status, attempts from jobs where take_id = ?', r.body.id)).toEqual([{ status: 'failed', attempts: 1 }])
    // A re-score needs a measurement.
    const rs = await app.fetch(`/api/takes/${r.body.id}/rescore`, { method: 'POST', cookie: clara, headers: { 'content-type': 'application/json' }, body: JSON.stringify({ system: { name: 'equal' } }) })
    expect(rs.status).toBe(409)
  })

  it('a damaged file fails as corrupt', async () => {
    const audio = new Uint8Array(readFileSync(join(FIXTURES, 'corrupt-flac-header-only.flac')))
    const r = await postTake(app, clara, { drillId, part: 'Soprano', audio })
    expect(r.status).toBe(202)
    const t = await waitForTake(app, clara, r.body.id)
    expect(t.status).toBe('failed')
    expect(['corrupt', 'empty']).toContain(t.error.code)
  })

  it('can be re-analysed by the player, which queues a new job', async () => {
    const silent = encodeWav(new Float32Array(8000 * 2), 8000)
    const r = await postTake(app, clara, { drillId, part: 'Soprano', audio: silent })
    await waitForTake(app, clara, r.body.id)
    expect((await app.fetch(`/api/takes/${r.body.id}/reanalyse`, { method: 'POST', cookie: marcus })).status).toBe(404)
    const again = await app.fetch(`/api/takes/${r.body.id}/reanalyse`, { method: 'POST', cookie: clara })
    expect(again.status).toBe(202)
    expect(await again.json()).toEqual({ status: 'queued' })
    const t = await waitForTake(app, clara, r.body.id)
    expect(t.error.code).toBe('silent')
    expect(dbQuery(app, 'select count(*) as n from jobs where take_id = ?', r.body.id)[0].n).toBe(2)
  })
})

describe('assignments a take answers', () => {
  it('links a take sent without an assignment to the player\'s one open assignment of that drill and part', async () => {
    // A demo drill where Clara has exactly one open assignment for the part the server preselects.
    let found: { drill: number, part: string, assignment: number } | null = null
    for (const e of await (await app.fetch('/api/ensembles', { cookie: clara })).json() as { id: number }[]) {
      for (const d of await (await app.fetch(`/api/ensembles/${e.id}/drills`, { cookie: clara })).json() as { id: number }[]) {
        const v = await (await app.fetch(`/api/drills/${d.id}`, { cookie: clara })).json() as any
        const open = v.openAssignments.filter((a: any) => a.part === v.preselectedPart)
        if (v.preselectedPart && open.length === 1) found = { drill: d.id, part: v.preselectedPart, assignment: open[0].id }
        if (found) break
      }
      if (found) break
    }
    if (!found) throw new Error('the demo gives Clara no drill with one open assignment')
    const { wav } = triadTake([0, 0, 0])
    const r = await postTake(app, clara, { drillId: found.drill, part: found.part, audio: wav })
    expect(r.status).toBe(202)
    const t = await (await app.fetch(`/api/takes/${r.body.id}`, { cookie: clara })).json() as any
    expect(t.assignmentId).toBe(found.assignment)
    const home = await (await app.fetch('/api/home', { cookie: clara })).json() as any
    expect(home.due.find((d: any) => d.assignmentId === found!.assignment)?.submitted).toBe(true)
  })

  it('sends each assignment on Home with its drill\'s tolerance', async () => {
    const tolerances: number[] = []
    for (const who of [clara, marcus]) {
      const home = await (await app.fetch('/api/home', { cookie: who })).json() as any
      for (const d of home.due) {
        const drill = await (await app.fetch(`/api/drills/${d.drillId}`, { cookie: who })).json() as any
        expect(d.tolerance).toBe(drill.document.tolerance)
        tolerances.push(d.tolerance)
      }
      for (const t of home.recent) expect(t.tolerance).toEqual(expect.any(Number))
    }
    // Meaningful only if some drill grades at something other than ±10 ¢.
    expect(tolerances.some(t => t !== 10)).toBe(true)
  })
})

describe('drills for takes', () => {
  it('lists an ensemble\'s drills to members only and shows one with targets and a preselected part', async () => {
    const list = await (await app.fetch(`/api/ensembles/${choir}/drills`, { cookie: clara })).json() as any[]
    const mine = list.find(d => d.id === drillId)
    expect(mine).toMatchObject({ title: 'E2E triad', key: 'A major', tempo: 60, a4: 440, tolerance: 10, chords: 3, parts: [{ name: 'Soprano', instrument: 'voice-soprano' }] })
    expect((await app.fetch(`/api/ensembles/${choir}/drills`, { cookie: marcus })).status).toBe(404)
    const d = await (await app.fetch(`/api/drills/${drillId}`, { cookie: clara })).json() as any
    expect(d).toMatchObject({ id: drillId, ensembleId: choir, role: 'player', preselectedPart: 'Soprano' })
    expect(d.targets.chords).toHaveLength(3)
    expect((await app.fetch(`/api/drills/${drillId}`, { cookie: marcus })).status).toBe(404)
  })

  it('imports a drill only for directors, and refuses a broken file with the importer\'s code', async () => {
    const form = (body: BlobPart, name: string) => { const f = new FormData(); f.append('file', new Blob([body]), name); return f }
    expect((await app.fetch(`/api/ensembles/${choir}/drills/import`, { method: 'POST', cookie: clara, body: form(JSON.stringify(triadDrill()), 'd.json') })).status).toBe(403)
    const bad = await app.fetch(`/api/ensembles/${choir}/drills/import`, { method: 'POST', cookie: director, body: form('{"title": "x", "parts": []}', 'd.json') })
    expect(bad.status).toBe(400)
    const junk = await app.fetch(`/api/ensembles/${choir}/drills/import`, { method: 'POST', cookie: director, body: form('hello', 'd.txt') })
    expect(junk.status).toBe(415)
    const titled = new FormData()
    titled.append('title', 'Renamed triad')
    titled.append('file', new Blob([JSON.stringify(triadDrill())]), 'd.json')
    const ok = await app.fetch(`/api/ensembles/${choir}/drills/import`, { method: 'POST', cookie: director, body: titled })
    expect(ok.status).toBe(201)
    expect(await ok.json()).toEqual({ id: expect.any(Number), parts: ['Soprano'], chords: 3, warnings: [] })
  })
})
