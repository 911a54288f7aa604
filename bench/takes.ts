// Upload-to-report benchmark of the take pipeline (`npm run bench:takes`). Needs a built app
// (`npm run build`). Starts it the way the e2e tests do (throwaway database, object store and
// mail folder; demo seed), waits until the demo takes are analysed, then
//   1. uploads one 60-s take and times upload finished → report ready (the 202, then the
//      take's event stream until `analysed`);
//   2. uploads eight 60-s takes at once and times each the same way;
// while a probe requests GET /api/home back to back and records how long other requests take
// while the workers run. Takes are synthesised sung holds (44.1 kHz, 16-bit mono WAV, 5.3 MB).
// Targets on a 2-core machine: one take ≤ 3 s, eight ≤ 15 s, other requests p95 < 100 ms.
//
// Usage: tsx bench/takes.ts [--workers N] [--nice 0-19] [--sample-rate HZ]
import { cpus, loadavg } from 'node:os'
import { parseArgs } from 'node:util'
import { join } from 'node:path'
import Database from 'better-sqlite3'
import { startApp, type App } from '../tests/e2e/harness'
import { retryStaleSockets } from '../tests/e2e/takes-helpers'
import { synthTake } from '../server/analysis/synth'
import { encodeWav } from '../server/analysis/wav'

const { values: args } = parseArgs({
  options: { 'workers': { type: 'string' }, 'nice': { type: 'string' }, 'sample-rate': { type: 'string', default: '44100' } },
})
const SR = Number(args['sample-rate'])
const TAKE_S = 60
const CHORDS = 15 // 15 chords × 4 beats at 60 bpm = 60 s
const NOTES = ['A4', 'C#5', 'E5', 'B4', 'D5', 'F#5', 'G#4', 'E5']
const MIDI: Record<string, number> = { 'A4': 69, 'C#5': 73, 'E5': 76, 'B4': 71, 'D5': 74, 'F#5': 78, 'G#4': 68 }

const drill = {
  title: 'Benchmark: a minute of held notes', key: 'A major', tempo: 60, a4: 440, system: { name: 'just-root' }, tolerance: 10,
  parts: [{ name: 'Soprano', instrument: 'voice-soprano' }],
  chords: Array.from({ length: CHORDS }, (_, i) => ({ beats: 4, symbol: 'A', notes: { Soprano: NOTES[i % NOTES.length]! } })),
}

function take (seed: number): Uint8Array {
  const samples = synthTake({
    sampleRate: SR, durationS: TAKE_S, timbre: 'voice-soprano', seed, snrDb: 30, jitterCents: 2,
    vibrato: { rateHz: 5.5, extentCents: 15 },
    holds: drill.chords.map((c, i) => ({
      startS: i * 4 + 0.1, endS: i * 4 + 3.8,
      hz: 440 * 2 ** ((MIDI[c.notes.Soprano]! - 69) / 12) * 2 ** ((((seed + i) % 11) - 5) / 1200),
    })),
  })
  return encodeWav(samples, SR)
}

const pct = (xs: number[], p: number) => {
  if (!xs.length) return NaN
  const s = [...xs].sort((a, b) => a - b)
  return s[Math.min(s.length - 1, Math.ceil((p / 100) * s.length) - 1)]!
}
const ms = (x: number) => `${Math.round(x)} ms`
const s1 = (x: number) => `${(x / 1000).toFixed(2)} s`

async function json (app: App, path: string, cookie: string) {
  const r = await app.fetch(path, { cookie })
  if (!r.ok) throw new Error(`${path} → ${r.status} ${await r.text()}`)
  return r.json() as Promise<any>
}

/** Resolves when the take's event stream says analysed (or failed), with the time it did. */
async function reported (app: App, cookie: string, id: number): Promise<{ at: number, status: string }> {
  const res = await app.fetch(`/api/takes/${id}/events`, { cookie })
  const reader = res.body!.getReader()
  const dec = new TextDecoder()
  let buf = ''
  for (;;) {
    const { done, value } = await reader.read()
    if (done) break
    buf += dec.decode(value, { stream: true })
    for (const m of buf.matchAll(/data: (\{.*\})\n/g)) {
      const d = JSON.parse(m[1]!)
      if (d.status === 'analysed' || d.status === 'failed') {
        const at = performance.now()
        await reader.cancel().catch(() => {})
        return { at, status: d.status }
      }
    }
  }
  const t = await json(app, `/api/takes/${id}`, cookie)
  return { at: performance.now(), status: t.status }
}

async function upload (app: App, cookie: string, drillId: number, wav: Uint8Array) {
  const form = new FormData()
  form.append('drillId', String(drillId))
  form.append('part', 'Soprano')
  form.append('audio', new Blob([new Uint8Array(wav)], { type: 'audio/wav' }), 'take.wav')
  const t0 = performance.now()
  const r = await app.fetch('/api/takes', { method: 'POST', body: form, cookie })
  const body = await r.json() as any
  if (r.status !== 202) throw new Error(`upload → ${r.status} ${JSON.stringify(body)}`)
  return { id: body.id as number, sentMs: performance.now() - t0, uploadedAt: performance.now() }
}

/** Requests GET /api/home back to back until stopped; returns each latency. */
function probe (app: App, cookie: string) {
  const lat: number[] = []
  let on = true
  const done = (async () => {
    while (on) {
      const t0 = performance.now()
      const r = await app.fetch('/api/home', { cookie })
      await r.arrayBuffer()
      lat.push(performance.now() - t0)
      await new Promise(r => setTimeout(r, 20))
    }
  })()
  return { stop: async () => { on = false; await done; return lat } }
}

async function main () {
  const env: Record<string, string> = {}
  if (args.workers) env.NUXT_ANALYSIS_WORKERS = args.workers
  if (args.nice) env.DRIFTLINE_ANALYSIS_NICE = args.nice
  console.log(`bench:takes — ${cpus().length} cores (${cpus()[0]?.model ?? '?'}), load ${loadavg().map(l => l.toFixed(2)).join(' ')}, Node ${process.version}`)
  const tStart = performance.now()
  const wavs = Array.from({ length: 9 }, (_, i) => take(101 + i))
  console.log(`${wavs.length} takes of ${TAKE_S} s synthesised (${(wavs[0]!.length / 1e6).toFixed(1)} MB each) in ${s1(performance.now() - tStart)}`)
  const app = retryStaleSockets(await startApp({ env }))
  try {
    const director = await app.login('helena.marsh@example.org')
    const player = await app.login('clara.lindqvist@example.org')
    const choir = (await json(app, '/api/ensembles', director)).find((e: any) => /Choir/.test(e.name))
    const form = new FormData()
    form.append('file', new Blob([JSON.stringify(drill)], { type: 'application/json' }), 'bench.json')
    const imp = await app.fetch(`/api/ensembles/${choir.id}/drills/import`, { method: 'POST', body: form, cookie: director })
    const drillId = (await imp.json() as any).id as number


    // The demo seed queues its own takes at start: let the workers finish them first.
    for (;;) {
      const page = await json(app, '/api/takes?pageSize=100', director)
      if (!page.items.some((t: any) => t.status === 'queued' || t.status === 'analysing')) break
      await new Promise(r => setTimeout(r, 250))
    }
    const idle = probe(app, player)
    await new Promise(r => setTimeout(r, 1500))
    const idleLat = await idle.stop()

    // 1. One take.
    const busy = probe(app, player)
    const one = await upload(app, player, drillId, wavs[0]!)
    const oneDone = await reported(app, player, one.id)
    const oneMs = oneDone.at - one.uploadedAt

    // 2. Eight at once.
    const t8 = performance.now()
    const eight = await Promise.all(wavs.slice(1).map(async (w) => {
      const u = await upload(app, player, drillId, w)
      const d = await reported(app, player, u.id)
      return { ...u, ...d, ms: d.at - u.uploadedAt }
    }))
    const lastAt = Math.max(...eight.map(e => e.at))
    const firstUploaded = Math.min(...eight.map(e => e.uploadedAt))
    const busyLat = await busy.stop()

    const all = [one, ...eight]
    // Where each take's time went, from its job row: waiting for a worker, reading the object,
    // decoding and measuring in the worker (the pool records these in the job's result).
    const db = new Database(join(app.dir, 'driftline.sqlite'), { readonly: true })
    const jobOf = (id: number) => {
      const r = db.prepare('select created_at, result from jobs where take_id = ? order by id desc limit 1').get(id) as { created_at: string, result: string | null } | undefined
      const res = r?.result ? JSON.parse(r.result) : {}
      return { waitMs: res.claimedAt ? Date.parse(res.claimedAt) - Date.parse(r!.created_at) : NaN, fetchMs: res.fetchMs, analyseMs: res.analyseMs }
    }
    const rows = await Promise.all(all.map(async (u) => {
      const t = await json(app, `/api/takes/${u.id}`, player)
      const j = jobOf(u.id)
      return { status: t.status, holds: `${t.report?.summary?.holdsFound ?? '–'}/${t.report?.summary?.holdsExpected ?? '–'}`, parts: `waited ${ms(j.waitMs)}, read ${ms(j.fetchMs)}, decode+measure ${ms(j.analyseMs)}` }
    }))
    db.close()

    console.log('')
    console.log('one 60-s take')
    console.log(`  upload sent in ${ms(one.sentMs)}; upload finished → report ${s1(oneMs)} (target ≤ 3 s); ${rows[0]!.status}, holds ${rows[0]!.holds}`)
    console.log(`    ${rows[0]!.parts}`)
    console.log('')
    console.log('eight 60-s takes uploaded at once')
    eight.forEach((e, i) => console.log(`  take ${i + 1}: upload sent in ${ms(e.sentMs)}; upload finished → report ${s1(e.ms)}; ${rows[i + 1]!.status}, holds ${rows[i + 1]!.holds}; ${rows[i + 1]!.parts}`))
    console.log(`  slowest upload finished → report ${s1(Math.max(...eight.map(e => e.ms)))}; first upload finished → last report ${s1(lastAt - firstUploaded)}; from the first request ${s1(lastAt - t8)} (target ≤ 15 s)`)
    console.log('')
    console.log('other requests (GET /api/home, back to back)')
    console.log(`  idle:                n=${idleLat.length}  p50 ${ms(pct(idleLat, 50))}  p95 ${ms(pct(idleLat, 95))}  max ${ms(Math.max(...idleLat))}`)
    console.log(`  while workers run:   n=${busyLat.length}  p50 ${ms(pct(busyLat, 50))}  p95 ${ms(pct(busyLat, 95))}  max ${ms(Math.max(...busyLat))}  (target p95 < 100 ms)`)
    const failed = rows.filter(r => r.status !== 'analysed').length
    if (failed) console.log(`\n${failed} take(s) not analysed`)
    console.log(`\nload after the run ${loadavg().map(l => l.toFixed(2)).join(' ')}`)
  } catch (err) {
    console.error(`server output:\n${app.output().split('\n').slice(-40).join('\n')}`)
    throw err
  } finally {
    await app.stop()
  }
}

main().catch((err) => { console.error(err); process.exit(1) })
