// The duration limit holds at upload: with the limit lowered to 5 s, a real 6-s WAV take (its
// header states 6 s: data chunk size over byte rate, Microsoft RIFF/WAVE) is refused with 413
// too_long before any row or object exists, while a 2-s take is still accepted.
import { mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { startApp, type App } from './harness'
import { dbQuery, ensembleId, importDrill, multipartUploadsStarted, postTake, retryStaleSockets, storedObjects, triadDrill } from './takes-helpers'
import { encodeWav } from '../../server/analysis/wav'

let dir: string
let app: App
let clara: string
let drillId: number

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'driftline-e2e-duration-'))
  app = retryStaleSockets(await startApp({ dir, env: { NUXT_ANALYSIS_MAX_DURATION_S: '5' } }))
  const director = await app.login('helena.marsh@example.org')
  clara = await app.login('clara.lindqvist@example.org')
  drillId = await importDrill(app, director, await ensembleId(app, director, /Choir/), triadDrill('E2E duration triad'))
})

afterAll(async () => {
  await app?.stop()
  if (dir) rmSync(dir, { recursive: true, force: true })
})

const tone = (seconds: number, rate = 22050) => {
  const x = new Float32Array(Math.round(seconds * rate))
  for (let i = 0; i < x.length; i++) x[i] = 0.3 * Math.sin((2 * Math.PI * 440 * i) / rate)
  return encodeWav(x, rate)
}
const mine = async () => ((await (await app.fetch('/api/takes?player=me', { cookie: clara })).json()) as any).total as number
const rows = () => dbQuery(app, 'select count(*) as n from takes')[0].n as number

describe('a take over the duration limit', () => {
  it('is refused at upload with 413 too_long when its WAV header states the length', async () => {
    const before = { mine: await mine(), rows: rows(), objects: storedObjects(app), uploads: multipartUploadsStarted(app) }
    const r = await postTake(app, clara, { drillId, part: 'Soprano', audio: tone(6), name: 'six-seconds.wav' })
    expect(r.status).toBe(413)
    expect(r.body.data).toMatchObject({ code: 'too_long', durationS: 6, maxDurationS: 5 })
    expect(r.body.message).toBe('The recording is longer than the allowed length')
    expect(await mine()).toBe(before.mine)
    expect(rows()).toBe(before.rows)
    expect(storedObjects(app)).toEqual(before.objects)
    // The multipart upload was aborted, not left open in the store.
    expect(multipartUploadsStarted(app)).toBe(before.uploads)
  })

  it('still accepts a take within the limit', async () => {
    const before = await mine()
    const r = await postTake(app, clara, { drillId, part: 'Soprano', audio: tone(2), name: 'two-seconds.wav' })
    expect(r.status).toBe(202)
    expect(await mine()).toBe(before + 1)
  })
})
