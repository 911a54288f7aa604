// Helpers of the take e2e tests: synthetic takes with known truth, multipart uploads (whole or
// cut off), waiting for a report, and read-only looks at the app's database and object store.
import { readdirSync, readFileSync, readlinkSync, statSync } from 'node:fs'
import { request } from 'node:http'
import { join } from 'node:path'
import Database from 'better-sqlite3'
import type { App } from './harness'
import { synthTakeWithTruth, type SynthSpec } from '../../server/analysis/synth'
import { encodeWav } from '../../server/analysis/wav'

export const FIXTURES = join(import.meta.dirname, '../fixtures/audio')

/** Equal-tempered frequency of a MIDI note: 440·2^((n−69)/12) (12-TET with A4 = 440 Hz, ISO 16; common practice). */
export const equalHz = (midi: number, a4 = 440) => a4 * 2 ** ((midi - 69) / 12)
export const cents = (from: number, to: number) => 1200 * Math.log2(to / from)

/** A drill of three held notes of the A major triad, one part, two beats each at 60 bpm. */
export function triadDrill (title = 'E2E triad') {
  return {
    title,
    key: 'A major',
    tempo: 60,
    a4: 440,
    system: { name: 'equal' },
    tolerance: 10,
    parts: [{ name: 'Soprano', instrument: 'voice-soprano' }],
    chords: [
      { beats: 2, symbol: 'A', notes: { Soprano: 'A4' } },
      { beats: 2, symbol: 'A', notes: { Soprano: 'C#5' } },
      { beats: 2, symbol: 'A', notes: { Soprano: 'E5' } },
    ],
  }
}

/** MIDI numbers of the triad drill's notes (A4 = 69, C#5 = 73, E5 = 76). */
export const TRIAD_MIDI = [69, 73, 76]

/**
 * A sung take of the triad drill: each note `offsets[i]` cents from equal temperament, starting
 * `leadS` seconds late; returns the WAV and the synthesiser's truth of each hold's centre.
 */
export function triadTake (offsets: number[], opts: { sampleRate?: number, leadS?: number, seed?: number, snrDb?: number } = {}) {
  const sr = opts.sampleRate ?? 44100
  const lead = opts.leadS ?? 0.3
  const spec: SynthSpec = {
    sampleRate: sr,
    durationS: lead + 6.4,
    timbre: 'voice-soprano',
    seed: opts.seed ?? 7,
    snrDb: opts.snrDb ?? 35,
    holds: TRIAD_MIDI.map((m, i) => ({ startS: lead + i * 2 + 0.05, endS: lead + i * 2 + 1.9, hz: equalHz(m) * 2 ** (offsets[i]! / 1200) })),
  }
  const { samples, holds } = synthTakeWithTruth(spec)
  return { wav: encodeWav(samples, sr), truth: holds.map(h => h.centreHz) }
}

/** A long take (for timing-sensitive tests): `chords` notes of `beats` beats each at 60 bpm. */
export function longDrill (chords: number, beats = 4, title = 'E2E long drill') {
  const notes = ['A4', 'C#5', 'E5', 'B4', 'D5', 'F#5', 'G#4', 'E5']
  return {
    title, key: 'A major', tempo: 60, a4: 440, system: { name: 'equal' }, tolerance: 10,
    parts: [{ name: 'Soprano', instrument: 'voice-soprano' }],
    chords: Array.from({ length: chords }, (_, i) => ({ beats, notes: { Soprano: notes[i % notes.length]! } })),
  }
}

const NOTE_MIDI: Record<string, number> = { 'A4': 69, 'C#5': 73, 'E5': 76, 'B4': 71, 'D5': 74, 'F#5': 78, 'G#4': 68 }

/** A take of longDrill(): each note sung at equal temperament, plus a small known offset. */
export function longTake (chords: number, beats = 4, sampleRate = 22050, seed = 3) {
  const drill = longDrill(chords, beats)
  const spb = 1 // 60 bpm
  const spec: SynthSpec = {
    sampleRate, durationS: chords * beats * spb + 0.5, timbre: 'voice-soprano', seed, snrDb: 35,
    holds: drill.chords.map((c, i) => ({ startS: i * beats * spb + 0.05, endS: (i + 1) * beats * spb - 0.1, hz: equalHz(NOTE_MIDI[c.notes.Soprano]!) * 2 ** (((i % 5) - 2) / 1200) })),
  }
  return encodeWav(synthTakeWithTruth(spec).samples, sampleRate)
}

/** Uploads a take with fetch (multipart built by FormData). */
export async function postTake (app: App, cookie: string, f: { drillId: number | string, part: string, audio: Uint8Array, name?: string, type?: string, assignmentId?: number, idempotencyKey?: string }) {
  const form = new FormData()
  form.append('drillId', String(f.drillId))
  form.append('part', f.part)
  if (f.assignmentId) form.append('assignmentId', String(f.assignmentId))
  if (f.idempotencyKey) form.append('idempotencyKey', f.idempotencyKey)
  form.append('audio', new Blob([new Uint8Array(f.audio)], { type: f.type ?? 'application/octet-stream' }), f.name ?? 'take.wav')
  const r = await app.fetch('/api/takes', { method: 'POST', body: form, cookie })
  return { status: r.status, body: await r.json().catch(() => null) as any }
}

/** Imports a drill JSON document into an ensemble as a director; returns its id. */
export async function importDrill (app: App, cookie: string, ensembleId: number, doc: unknown): Promise<number> {
  const form = new FormData()
  form.append('file', new Blob([JSON.stringify(doc)], { type: 'application/json' }), 'drill.json')
  const r = await app.fetch(`/api/ensembles/${ensembleId}/drills/import`, { method: 'POST', body: form, cookie })
  const body = await r.json() as any
  if (r.status !== 201) throw new Error(`import → ${r.status} ${JSON.stringify(body)}`)
  return body.id
}

/** Polls GET /api/takes/:id until the take is analysed or failed. */
export async function waitForTake (app: App, cookie: string, id: number, timeoutMs = 90_000): Promise<any> {
  const deadline = Date.now() + timeoutMs
  for (;;) {
    const r = await app.fetch(`/api/takes/${id}`, { cookie })
    const t = await r.json() as any
    if (r.status !== 200) throw new Error(`GET take ${id} → ${r.status} ${JSON.stringify(t)}`)
    if (t.status === 'analysed' || t.status === 'failed') return t
    if (Date.now() > deadline) throw new Error(`take ${id} still ${t.status} after ${timeoutMs} ms`)
    await new Promise(r => setTimeout(r, 100))
  }
}

/** The ensemble id by name, as the caller sees it. */
export async function ensembleId (app: App, cookie: string, name: RegExp): Promise<number> {
  const list = await (await app.fetch('/api/ensembles', { cookie })).json() as { id: number, name: string }[]
  const e = list.find(x => name.test(x.name))
  if (!e) throw new Error(`no ensemble ${name}`)
  return e.id
}

/** Runs a read-only query against the app's database. */
export function dbQuery<T = any> (app: App, sql: string, ...params: unknown[]): T[] {
  const db = new Database(join(app.dir, 'driftline.sqlite'), { readonly: true, fileMustExist: true })
  try { return db.prepare(sql).all(...params) as T[] } finally { db.close() }
}

/** Files of stored objects in the embedded object store (s3rver keeps each as "<key>._S3rver_object"). */
export function storedObjects (app: App): string[] {
  const out: string[] = []
  const walk = (d: string) => {
    let names: string[]
    try { names = readdirSync(d) } catch { return }
    for (const n of names) {
      const p = join(d, n)
      if (statSync(p).isDirectory()) walk(p)
      else if (n.endsWith('._S3rver_object')) out.push(p)
    }
  }
  walk(join(app.dir, 'objects'))
  return out.sort()
}

/** Every file under a folder (recursively). */
export function filesUnder (dir: string): string[] {
  const out: string[] = []
  const walk = (d: string) => {
    let names: string[]
    try { names = readdirSync(d) } catch { return }
    for (const n of names) {
      const p = join(d, n)
      if (statSync(p).isDirectory()) walk(p)
      else out.push(p)
    }
  }
  walk(dir)
  return out
}

/** The pid of the built server started in `app.dir` (found through /proc: the harness keeps its child to itself). */
export function serverPid (app: App): number {
  for (const name of readdirSync('/proc')) {
    if (!/^\d+$/.test(name)) continue
    try {
      if (readlinkSync(`/proc/${name}/cwd`) !== app.dir) continue
      const cmd = readFileSync(`/proc/${name}/cmdline`, 'utf8')
      if (cmd.includes('.output/server/index.mjs')) return Number(name)
    } catch { /* gone or not ours */ }
  }
  throw new Error(`no server process runs in ${app.dir}`)
}

/**
 * Sends a multipart upload by hand and cuts the connection after `sendBytes` of the body
 * (the Content-Length header announces the whole body). Resolves when the socket is closed.
 */
export function cutOffUpload (app: App, cookie: string, fields: Record<string, string>, file: { bytes: Uint8Array, name: string }, sendBytes: number, opts: { chunked?: boolean, cutWhen?: () => boolean } = {}): Promise<void> {
  const boundary = `----driftline-e2e-${Date.now()}`
  const head = Object.entries(fields).map(([k, v]) => `--${boundary}\r\nContent-Disposition: form-data; name="${k}"\r\n\r\n${v}\r\n`).join('') +
    `--${boundary}\r\nContent-Disposition: form-data; name="audio"; filename="${file.name}"\r\nContent-Type: application/octet-stream\r\n\r\n`
  const tail = `\r\n--${boundary}--\r\n`
  const body = Buffer.concat([Buffer.from(head), Buffer.from(file.bytes), Buffer.from(tail)])
  const url = new URL('/api/takes', app.url)
  return new Promise((resolve) => {
    const req = request({
      host: url.hostname, port: url.port, path: url.pathname, method: 'POST',
      headers: {
        'content-type': `multipart/form-data; boundary=${boundary}`,
        ...(opts.chunked ? {} : { 'content-length': String(body.length) }),
        cookie,
      },
    })
    req.on('error', () => resolve())
    req.on('close', () => resolve())
    req.on('response', (res) => { res.resume(); res.on('end', () => resolve()) })
    let sent = 0
    const step = 256 * 1024
    const pump = () => {
      while (sent < sendBytes) {
        const n = Math.min(step, sendBytes - sent)
        const ok = req.write(body.subarray(sent, sent + n))
        sent += n
        if (!ok) { req.once('drain', pump); return }
      }
      // Give the server time to take in what was sent (and, when asked, to reach a given
      // point such as starting its multipart upload), then cut.
      const until = Date.now() + 15_000
      const wait = () => {
        if (!opts.cutWhen || opts.cutWhen() || Date.now() > until) req.destroy()
        else setTimeout(wait, 50)
      }
      setTimeout(wait, 400)
    }
    pump()
  })
}

/** Reads server-sent events from a response until the stream ends; returns [event, data] pairs. */
export async function readEvents (res: Response, timeoutMs = 60_000): Promise<[string, any][]> {
  const out: [string, any][] = []
  const reader = res.body!.getReader()
  const dec = new TextDecoder()
  let buf = ''
  const timer = setTimeout(() => reader.cancel(), timeoutMs)
  try {
    for (;;) {
      const { done, value } = await reader.read()
      if (done) break
      buf += dec.decode(value, { stream: true })
      let i: number
      while ((i = buf.indexOf('\n\n')) >= 0) {
        const block = buf.slice(0, i)
        buf = buf.slice(i + 2)
        let ev = 'message'
        let data = ''
        for (const line of block.split('\n')) {
          if (line.startsWith('event:')) ev = line.slice(6).trim()
          else if (line.startsWith('data:')) data += line.slice(5).trim()
        }
        if (data) out.push([ev, JSON.parse(data)])
      }
    }
  } finally {
    clearTimeout(timer)
  }
  return out
}

/** Multipart uploads the embedded store was asked to start (s3rver keeps each under "._S3rver_uploads/<id>"). */
export function multipartUploadsStarted (app: App): number {
  let n = 0
  const root = join(app.dir, 'objects')
  let buckets: string[] = []
  try { buckets = readdirSync(root) } catch { return 0 }
  for (const b of buckets) {
    try { n += readdirSync(join(root, b, '._S3rver_uploads')).length } catch { /* none */ }
  }
  return n
}

/**
 * Makes app.fetch send a request again when it went out on a kept-alive socket the server had
 * just closed for idleness (undici: "other side closed" before any answer), as browsers do. The
 * tests block their event loop while synthesising takes, which makes that race likely.
 */
export function retryStaleSockets (app: App): App {
  const plain = app.fetch
  app.fetch = async (path, init = {}) => {
    try {
      return await plain(path, init)
    } catch (err) {
      const code = (err as { cause?: { code?: string } })?.cause?.code
      if (code !== 'UND_ERR_SOCKET' && code !== 'ECONNRESET') throw err
      if (init.body instanceof ReadableStream) throw err // a streamed body cannot be sent twice
      return plain(path, init)
    }
  }
  return app
}

/** Byte-for-byte equality of two buffers (fast, unlike a deep equal of 500 000 elements). */
export function sameBytes (a: ArrayBuffer | Uint8Array, b: Uint8Array): boolean {
  return Buffer.from(a instanceof Uint8Array ? a : new Uint8Array(a)).equals(Buffer.from(b))
}
