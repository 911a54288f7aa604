// Takes survive what goes wrong around them: an upload cut off half-way leaves neither a row nor
// an object, an oversized upload is refused with 413, and a server killed in the middle of an
// analysis finishes the job after a restart against the same data.
import { mkdtempSync, rmSync } from 'node:fs'
import { request as httpRequest } from 'node:http'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { startApp, type App } from './harness'
import {
  cutOffUpload, dbQuery, ensembleId, importDrill, longDrill, longTake, multipartUploadsStarted, postTake, retryStaleSockets, serverPid, storedObjects,
  triadDrill, triadTake, waitForTake,
} from './takes-helpers'
import { encodeWav } from '../../server/analysis/wav'

const MAX_UPLOAD = 40 * 1024 * 1024
const env = { NUXT_ANALYSIS_MAX_UPLOAD_BYTES: String(MAX_UPLOAD) }

let dir: string
let app: App
let director: string
let clara: string
let choir: number
let drillId: number

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'driftline-e2e-resilience-'))
  app = retryStaleSockets(await startApp({ dir, env }))
  director = await app.login('helena.marsh@example.org')
  clara = await app.login('clara.lindqvist@example.org')
  choir = await ensembleId(app, director, /Choir/)
  drillId = await importDrill(app, director, choir, triadDrill('E2E resilience triad'))
})

afterAll(async () => {
  await app?.stop()
  if (dir) rmSync(dir, { recursive: true, force: true })
})

const takeCount = () => dbQuery(app, 'select count(*) as n from takes')[0].n as number

describe('an upload cut off half-way', () => {
  // A valid WAV header in front of 24 MB of samples: well past one 8 MB part of the multipart upload.
  const big = encodeWav(new Float32Array(12_000_000), 44100)

  it('after parts went up to the store: no row, no object', async () => {
    const before = { takes: takeCount(), objects: storedObjects(app), multipart: multipartUploadsStarted(app) }
    await cutOffUpload(app, clara, { drillId: String(drillId), part: 'Soprano' }, { bytes: big, name: 'big.wav' }, Math.floor(big.length / 2),
      { cutWhen: () => multipartUploadsStarted(app) > before.multipart })
    await new Promise(r => setTimeout(r, 1500)) // let the server notice and abort
    // The cut came after the store had begun a multipart upload (so there was something to abort).
    expect(multipartUploadsStarted(app)).toBe(before.multipart + 1)
    expect(takeCount()).toBe(before.takes)
    // Aborted multipart uploads never become objects. (The local fake keeps the parts of an aborted
    // upload on its disk because it does not implement AbortMultipartUpload; a real store frees them.)
    expect(storedObjects(app)).toEqual(before.objects)
  })

  it('before the first part was sent: no row, no object', async () => {
    const before = { takes: takeCount(), objects: storedObjects(app), multipart: multipartUploadsStarted(app) }
    await cutOffUpload(app, clara, { drillId: String(drillId), part: 'Soprano' }, { bytes: big.subarray(0, 2_000_000), name: 'small.wav' }, 700_000)
    await new Promise(r => setTimeout(r, 800))
    expect(multipartUploadsStarted(app)).toBe(before.multipart)
    expect(takeCount()).toBe(before.takes)
    expect(storedObjects(app)).toEqual(before.objects)
  })

  it('leaves the server working: the next upload is analysed', async () => {
    const { wav } = triadTake([0, 3, -3])
    const r = await postTake(app, clara, { drillId, part: 'Soprano', audio: wav })
    expect(r.status).toBe(202)
    expect((await waitForTake(app, clara, r.body.id)).status).toBe('analysed')
  })
})

describe('an upload over the size limit', () => {
  it('is refused with 413 from its declared length, before it is read', async () => {
    const before = storedObjects(app)
    const big = encodeWav(new Float32Array(MAX_UPLOAD / 2 + 1000), 44100)
    const r = await postTake(app, clara, { drillId, part: 'Soprano', audio: big })
    expect(r.status).toBe(413)
    expect(r.body.data.code).toBe('too_large')
    expect(storedObjects(app)).toEqual(before)
  })

  it('is refused with 413 when sent without a length (chunked), and nothing is kept', async () => {
    const before = { takes: takeCount(), objects: storedObjects(app) }
    const big = encodeWav(new Float32Array(MAX_UPLOAD / 2 + 1000), 44100)
    const form = new FormData()
    form.append('drillId', String(drillId))
    form.append('part', 'Soprano')
    form.append('audio', new Blob([new Uint8Array(big)]), 'big.wav')
    // A streamed body has no Content-Length: the limit must hold while reading. Sent with
    // node:http so the server's early answer is read even when it closes before the body is sent.
    const encoded = new Response(form)
    const r = await postChunked(app.url + '/api/takes', encoded.headers.get('content-type')!, clara, new Uint8Array(await encoded.arrayBuffer()))
    expect(r.status).toBe(413)
    await new Promise(r => setTimeout(r, 800))
    expect(takeCount()).toBe(before.takes)
    expect(storedObjects(app)).toEqual(before.objects)
  })
})

describe('a server killed in the middle of an analysis', () => {
  it('finishes the job after a restart against the same data', async () => {
    // Four minutes of audio: long enough to catch the worker half-way.
    const chords = 60
    const longId = await importDrill(app, director, choir, longDrill(chords))
    const r = await postTake(app, clara, { drillId: longId, part: 'Soprano', audio: longTake(chords) })
    expect(r.status).toBe(202)
    const id = r.body.id as number

    let seen: any
    const deadline = Date.now() + 120_000
    for (;;) {
      seen = await (await app.fetch(`/api/takes/${id}`, { cookie: clara })).json()
      if (seen.status === 'analysing' && seen.progress >= 0.15) break
      if (seen.status === 'analysed' || seen.status === 'failed' || Date.now() > deadline) throw new Error(`never caught mid-analysis: ${JSON.stringify(seen).slice(0, 200)}`)
      await new Promise(r => setTimeout(r, 20))
    }
    expect(seen.progress).toBeLessThan(1)
    process.kill(serverPid(app), 'SIGKILL')
    await app.stop() // reaps the killed process; the folder stays (it was given)
    expect(dbQuery(app, 'select status from jobs where take_id = ?', id)).toEqual([{ status: 'running' }])

    app = retryStaleSockets(await startApp({ dir, env }))
    clara = await app.login('clara.lindqvist@example.org')
    director = await app.login('helena.marsh@example.org')
    const t = await waitForTake(app, clara, id, 120_000)
    expect(t.status, JSON.stringify(t.error)).toBe('analysed')
    expect(t.report.summary.holdsFound).toBe(chords)
    // The same job row ran again: claimed once before the kill and once after.
    expect(dbQuery(app, 'select status, attempts from jobs where take_id = ?', id)).toEqual([{ status: 'done', attempts: 2 }])
    expect(dbQuery(app, 'select count(*) as n from analyses where take_id = ?', id)[0].n).toBe(1)
    expect(app.output()).toMatch(/interrupted job\(s\) back in the queue/)
  })
})

/**
 * Posts a body in chunks without a length (chunked transfer) with node:http. The server answers
 * 413 and closes the connection before the whole body is sent, so a write error after the
 * answer (EPIPE, ECONNRESET) is expected; fetch would report it instead of the answer.
 */
function postChunked (url: string, type: string, cookie: string, payload: Uint8Array): Promise<{ status: number }> {
  return new Promise((resolve, reject) => {
    let answered = false
    const req = httpRequest(url, { method: 'POST', headers: { 'content-type': type, cookie } }, (res) => {
      answered = true
      res.resume()
      res.on('end', () => resolve({ status: res.statusCode ?? 0 }))
      res.on('error', reject)
    })
    req.on('error', (e: NodeJS.ErrnoException) => {
      if (e.code !== 'EPIPE' && e.code !== 'ECONNRESET') reject(e)
    })
    req.on('close', () => { if (!answered) reject(new Error('the connection closed without an answer')) })
    for (let i = 0; i < payload.length && !req.destroyed; i += 64 * 1024) req.write(payload.subarray(i, i + 64 * 1024))
    req.end()
  })
}
