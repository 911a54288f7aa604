// Accuracy and speed benchmark of the take analysis engine (`npm run bench:analysis`).
//
// Builds its own corpus with known truth (synthTakeWithTruth): voice-shaped (formant) and
// brass-shaped harmonic spectra, notes from 29 Hz to 1.6 kHz, vibrato 0–±30 ¢ at 4.5–6.5 Hz,
// slow wobble and jitter, breath-like noise at 10–40 dB SNR, drift within holds, late starts,
// tempo ±15 %, breaths between chords, repeated notes and rests. Every take is encoded to WAV
// and decoded again (decoding is part of the timed work). Three methods run on the same audio:
//   Driftline  — the engine (decode → coarse YIN → alignment → harmonic-phase refinement);
//   YIN        — plain pitchfinder YIN, 2048-sample frames, hop 512, at the file's rate;
//   McLeod     — pitchy's McLeod Pitch Method, the same frames.
// The two plain methods are given each hold's true steady window (no alignment needed) and
// take the median of their frame estimates inside it; the engine has to find the holds.
//
// A second table measures takes rendered from sampled instruments and voices (bench/sampled.ts).
//
// Usage: tsx bench/analysis.ts [--quick] [--seed N] [--sampled DIR] [--no-sampled]
import { parseArgs } from 'node:util'
import { YIN } from 'pitchfinder'
import { PitchDetector } from 'pitchy'
import { decodeAudio } from '../server/analysis/decode'
import { encodeWav } from '../server/analysis/wav'
import { mulberry32, synthTakeWithTruth, SYNTH_STEADY_AFTER_ONSET_S } from '../server/analysis/synth'
import type { SynthHold, SynthTimbre } from '../server/analysis/synth'
import { measureTake } from '../server/analysis/measure'
import type { ExpectedHold } from '../server/analysis/types'
import { sampledTable } from './sampled'

const { values: args } = parseArgs({
  options: {
    quick: { type: 'boolean', default: false },
    seed: { type: 'string', default: '20240611' },
    take: { type: 'string' }, // print one take's holds in detail and stop
    sampled: { type: 'string', default: 'storage/sampled-corpus' }, // where the sampled corpus is rendered (kept between runs)
    'no-sampled': { type: 'boolean', default: false },
  },
})
const QUICK = args.quick === true
const SEED = Number(args.seed)

interface Truth {
  takeId: number
  bandHz: number
  snrDb: number
  vibratoCents: number
  wobble: boolean
  hz: number
  truthHz: number
  steadyStartS: number
  steadyEndS: number
}

interface TakeCase {
  id: number
  sampleRate: number
  bits: 16 | 24
  wav: Uint8Array
  durationS: number
  expected: ExpectedHold[]
  truths: Array<Truth | null> // per expected note hold (null for none)
}

const PITCH_BANDS: Array<[number, number, SynthTimbre[]]> = [
  [29, 60, ['brass']],
  [60, 120, ['voice-bass', 'brass']],
  [120, 250, ['voice-tenor', 'voice-bass', 'brass']],
  [250, 500, ['voice-alto', 'voice-tenor', 'brass']],
  [500, 1000, ['voice-soprano', 'brass']],
  [1000, 1600, ['voice-soprano', 'brass']],
]
const SNRS = [40, 30, 20, 10]

const cpuMs = () => process.cpuUsage().user / 1000 + process.cpuUsage().system / 1000

// ---------- corpus
function buildCorpus (): TakeCase[] {
  const rand = mulberry32(SEED)
  const pick = <T>(a: T[]): T => a[Math.floor(rand() * a.length)]!
  const uni = (lo: number, hi: number) => lo + (hi - lo) * rand()
  const takes: TakeCase[] = []
  let id = 0
  for (const [bi, [lo, hi, timbres]] of PITCH_BANDS.entries()) {
    for (const [si, snr] of SNRS.entries()) {
      // Default: every band and SNR has a take without and one with vibrato (±30 ¢ in every
      // other band, 10–30 ¢ otherwise). Quick: one take, with and without alternating.
      const reps = QUICK ? [(bi + si) % 2] : [0, 1]
      for (const rep of reps) {
        const vib = rep === 1 ? { rateHz: uni(4.5, 6.5), extentCents: (bi + si) % 2 === 0 || QUICK ? 30 : uni(10, 30) } : undefined
        const wobble = id % 3 === 0
        const timbre = pick(timbres)
        const tempo = uni(70, 110)
        const chords = 3
        const sr = id % 4 === 3 ? 48000 : 44100
        const bits: 16 | 24 = id % 6 === 5 ? 24 : 16
        const leadIn = uni(0.3, 2.5)
        const tempoFactor = uni(0.85, 1.15)
        const lowMidi = 69 + 12 * Math.log2(lo / 440)
        const highMidi = 69 + 12 * Math.log2(hi / 440)
        const expected: ExpectedHold[] = []
        const synthHolds: SynthHold[] = []
        const meta: Array<{ hz: number } | null> = []
        let beat = 0
        let prevMidi: number | null = null
        for (let c = 0; c < chords; c++) {
          const beats = pick([2, 3, 3, 4])
          const startS = beat * 60 / tempo
          beat += beats
          const endS = beat * 60 / tempo
          // Rests now and then; repeated notes now and then.
          if (c > 0 && rand() < 0.12) { expected.push({ index: c, startS, endS, midi: null, expectedHz: 0 }); meta.push(null); prevMidi = null; continue }
          let midi = Math.round(uni(Math.ceil(lowMidi), Math.floor(highMidi)))
          if (prevMidi !== null && rand() < 0.25) midi = prevMidi
          prevMidi = midi
          const eq = 440 * Math.pow(2, (midi - 69) / 12)
          expected.push({ index: c, startS, endS, midi, expectedHz: eq })
          const playedHz = eq * Math.pow(2, uni(-20, 20) / 1200)
          const t0 = leadIn + tempoFactor * startS + uni(0, 0.08)
          const t1 = leadIn + tempoFactor * endS - uni(0.1, 0.4) // a breath before the next chord
          synthHolds.push({ startS: t0, endS: t1, hz: playedHz, driftCentsPerS: wobble ? uni(-3, 3) : 0 })
          meta.push({ hz: playedHz })
        }
        const durationS = leadIn + tempoFactor * beat * 60 / tempo + 0.8
        const syn = synthTakeWithTruth({
          sampleRate: sr,
          durationS,
          holds: synthHolds,
          timbre,
          snrDb: snr,
          seed: SEED + 7919 * id,
          breaths: true,
          jitterCents: wobble ? uni(2, 3) : uni(0, 1),
          ...(vib ? { vibrato: vib } : {}),
        })
        let k = 0
        const truths = meta.map(m => {
          if (!m) return null
          const t = syn.holds[k++]!
          return {
            takeId: id, bandHz: lo, snrDb: snr, vibratoCents: vib?.extentCents ?? 0, wobble,
            hz: m.hz, truthHz: t.centreHz, steadyStartS: t.steadyStartS, steadyEndS: t.steadyEndS,
          }
        })
        const wav = encodeWav(syn.samples, sr, { bits })
        takes.push({ id, sampleRate: sr, bits, wav, durationS, expected, truths })
        id++
      }
    }
  }
  return takes
}

// Bias sweep: per pitch band one take of eight clean steady notes (SNR 30 dB, no vibrato, no
// wobble) spread over the band, voice and brass spectra alternating between bands' timbres.
function buildSweep (): TakeCase[] {
  const takes: TakeCase[] = []
  const notesPerBand = QUICK ? 4 : 8
  for (const [bi, [lo, hi, timbres]] of PITCH_BANDS.entries()) {
    const sr = 44100
    const expected: ExpectedHold[] = []
    const holds: SynthHold[] = []
    const rand = mulberry32(SEED + 100 + bi)
    for (let i = 0; i < notesPerBand; i++) {
      // Frequencies spread evenly (in log) over the band, each a random few cents off equal.
      const f = lo * Math.pow(hi / lo, (i + 0.5) / notesPerBand)
      const midi = Math.round(69 + 12 * Math.log2(f / 440))
      const eq = 440 * Math.pow(2, (midi - 69) / 12)
      expected.push({ index: i, startS: 2 * i, endS: 2 * i + 2, midi, expectedHz: eq })
      holds.push({ startS: 0.5 + 2 * i + 0.04, endS: 0.5 + 2 * i + 1.75, hz: eq * Math.pow(2, (rand() * 40 - 20) / 1200) })
    }
    const durationS = 0.5 + 2 * notesPerBand + 0.6
    const syn = synthTakeWithTruth({ sampleRate: sr, durationS, holds, timbre: timbres[bi % timbres.length]!, snrDb: 30, seed: SEED + 200 + bi })
    const truths = syn.holds.map((t, i) => ({
      takeId: 1000 + bi, bandHz: lo, snrDb: 30, vibratoCents: 0, wobble: false,
      hz: holds[i]!.hz, truthHz: t.centreHz, steadyStartS: t.steadyStartS, steadyEndS: t.steadyEndS,
    }))
    takes.push({ id: 1000 + bi, sampleRate: sr, bits: 16, wav: encodeWav(syn.samples, sr), durationS, expected, truths })
  }
  return takes
}

// ---------- methods
interface Result { found: boolean, hz: number | null }

function plainCentres (samples: Float32Array, sr: number, windows: Array<[number, number]>, method: 'yin' | 'mcleod'): Result[] {
  const N = 2048
  const hop = 512
  const yin = YIN({ sampleRate: sr })
  const mpm = PitchDetector.forFloat32Array(N)
  return windows.map(([a, b]) => {
    const est: number[] = []
    // The same frame grid as a whole-file run: frames start at multiples of the hop.
    for (let s = Math.ceil((a * sr - N / 2) / hop) * hop; s + N / 2 <= b * sr && s + N <= samples.length; s += hop) {
      if (s < 0) continue
      const frame = samples.subarray(s, s + N)
      if (method === 'yin') {
        const f = yin(frame)
        if (f !== null && Number.isFinite(f) && f > 0) est.push(f)
      } else {
        const [f, clarity] = mpm.findPitch(frame, sr)
        if (clarity >= 0.9 && f > 0) est.push(f)
      }
    }
    if (est.length < 3) return { found: false, hz: null }
    est.sort((p, q) => p - q)
    return { found: true, hz: est[est.length >> 1]! }
  })
}

function plainWholeFile (samples: Float32Array, sr: number, method: 'yin' | 'mcleod'): number {
  const N = 2048
  const hop = 512
  const yin = YIN({ sampleRate: sr })
  const mpm = PitchDetector.forFloat32Array(N)
  let voiced = 0
  for (let s = 0; s + N <= samples.length; s += hop) {
    const frame = samples.subarray(s, s + N)
    if (method === 'yin') { if (yin(frame) !== null) voiced++ } else if (mpm.findPitch(frame, sr)[1] >= 0.9) voiced++
  }
  return voiced
}

// ---------- statistics
const cents = (a: number, b: number) => 1200 * Math.log2(a / b)
function q (values: number[], p: number): number {
  if (!values.length) return NaN
  const a = [...values].sort((x, y) => x - y)
  const pos = p * (a.length - 1)
  const lo = Math.floor(pos)
  return a[lo]! + (a[Math.ceil(pos)]! - a[lo]!) * (pos - lo)
}
const fmt = (v: number, d = 3) => (Number.isFinite(v) ? v.toFixed(d) : '—')
const sgn = (v: number, d = 3) => (Number.isFinite(v) ? (v >= 0 ? '+' : '−') + Math.abs(v).toFixed(d) : '—')

interface Row { truth: Truth, err: number | null }

async function main () {
  const t0 = Date.now()
  const corpus = buildCorpus()
  const audioS = corpus.reduce((s, c) => s + c.durationS, 0)
  const holdsTotal = corpus.reduce((s, c) => s + c.truths.filter(Boolean).length, 0)
  console.log(`Driftline analysis benchmark${QUICK ? ' (quick)' : ''}: ${corpus.length} takes, ${holdsTotal} holds, ${audioS.toFixed(0)} s of audio (corpus built in ${((Date.now() - t0) / 1000).toFixed(1)} s)`)
  console.log('Truth of a hold: exp of the mean synthesised log-frequency over its steady window,')
  console.log(`from onset + ${SYNTH_STEADY_AFTER_ONSET_S} s to the start of the release − 0.05 s, shortened equally at both ends to whole`)
  console.log('vibrato cycles when there is vibrato (wobble, drift and jitter included as synthesised).')
  console.log('Speed: CPU time of this process (user + system), decode included; the machine is shared, so figures are noisy.\n')

  if (args.take !== undefined) {
    const take = corpus[Number(args.take)]!
    const audio = await decodeAudio(take.wav)
    const m = measureTake(audio, take.expected, { trace: false })
    console.log(JSON.stringify({ id: take.id, sampleRate: take.sampleRate, durationS: take.durationS, timeScale: m.timeScale, offsetS: m.offsetS, warnings: m.warnings }))
    const truths = take.truths.filter((t): t is Truth => t !== null)
    take.expected.filter(h => h.midi !== null).forEach((h, i) => {
      const held = m.holds.find(x => x.index === h.index)!
      const t = truths[i]!
      console.log(JSON.stringify({ expected: h, truth: t, measured: held, errCents: held.detectedHz ? cents(held.detectedHz, t.truthHz) : null }))
    })
    return
  }

  const evaluate = async (takes: TakeCase[]) => {
    const rows: Record<'engine' | 'yin' | 'mcleod', Row[]> = { engine: [], yin: [], mcleod: [] }
    let engineCpu = 0
    let decodeCpu = 0
    for (const take of takes) {
      const c0 = cpuMs()
      const audio = await decodeAudio(take.wav)
      const c1 = cpuMs()
      if (audio.sampleRate !== take.sampleRate) throw new Error(`decoded rate ${audio.sampleRate} ≠ ${take.sampleRate}`)
      const m = measureTake(audio, take.expected, { trace: false })
      const c2 = cpuMs()
      decodeCpu += c1 - c0
      engineCpu += c2 - c0
      const notes = take.expected.filter(h => h.midi !== null)
      const truths = take.truths.filter((t): t is Truth => t !== null)
      notes.forEach((h, i) => {
        const held = m.holds.find(x => x.index === h.index)!
        const truth = truths[i]!
        rows.engine.push({ truth, err: held.detectedHz === null ? null : cents(held.detectedHz, truth.truthHz) })
      })
      const windows = truths.map(t => [t.steadyStartS, t.steadyEndS] as [number, number])
      for (const method of ['yin', 'mcleod'] as const) {
        const res = plainCentres(audio.samples, audio.sampleRate, windows, method)
        res.forEach((r, i) => rows[method].push({ truth: truths[i]!, err: r.hz === null ? null : cents(r.hz, truths[i]!.truthHz) }))
      }
    }
    return { rows, engineCpu, decodeCpu }
  }
  const { rows, engineCpu, decodeCpu } = await evaluate(corpus)
  const sweep = await evaluate(buildSweep())

  // Speed on a 60-s take (four-voice-range drill sung by an alto, SNR 30 dB, vibrato ±20 ¢).
  const speed = await speedRun()

  const methods = ['engine', 'yin', 'mcleod'] as const
  const names = { engine: 'Driftline', yin: 'YIN (pitchfinder)', mcleod: 'McLeod (pitchy)' }
  const table: string[][] = [['figure (counts of holds in brackets)', 'target', names.engine, names.yin, names.mcleod]]
  const stat = (m: typeof methods[number], filter: (t: Truth) => boolean, f: (errs: number[]) => string) => {
    const errs = rows[m].filter(r => filter(r.truth) && r.err !== null && Math.abs(r.err) <= 50).map(r => r.err!)
    return f(errs)
  }
  const medP95 = (errs: number[]) => errs.length ? `${fmt(q(errs.map(Math.abs), 0.5))} / ${fmt(q(errs.map(Math.abs), 0.95))} (${errs.length})` : '—'
  const noVib = (t: Truth) => t.vibratoCents === 0
  for (const snr of SNRS) {
    const target = snr >= 30 ? '≤ 0.1 / ≤ 0.5' : snr === 20 ? '≤ 0.3 / ≤ 1' : '—'
    table.push([`|error| median / p95, SNR ${snr} dB, no vibrato (¢)`, target, ...methods.map(m => stat(m, t => noVib(t) && t.snrDb === snr, medP95))])
  }
  table.push(['  … SNR ≥ 30 dB, no vibrato, steady (no wobble)', '≤ 0.1 / ≤ 0.5', ...methods.map(m => stat(m, t => noVib(t) && t.snrDb >= 30 && !t.wobble, medP95))])
  table.push(['  … SNR ≥ 30 dB, no vibrato, with wobble + drift', '—', ...methods.map(m => stat(m, t => noVib(t) && t.snrDb >= 30 && t.wobble, medP95))])
  table.push(['|error| median / p95, vibrato ±30 ¢, SNR ≥ 20 dB (¢)', '≤ 0.5 median', ...methods.map(m => stat(m, t => t.vibratoCents >= 29.9 && t.snrDb >= 20, medP95))])
  table.push(['|error| median / p95, any vibrato, all SNR (¢)', '—', ...methods.map(m => stat(m, t => t.vibratoCents > 0, medP95))])
  for (const [lo, hi] of PITCH_BANDS) {
    table.push([`bias: mean signed error ± SE, ${lo}–${hi} Hz sweep (¢)`, '|bias| ≤ 0.1', ...methods.map(m => {
      const e = sweep.rows[m].filter(r => r.truth.bandHz === lo && r.err !== null && Math.abs(r.err) <= 50).map(r => r.err!)
      if (e.length < 2) return e.length ? `${sgn(e[0]!)} (1)` : '—'
      const mean = e.reduce((a, v) => a + v, 0) / e.length
      const sd = Math.sqrt(e.reduce((a, v) => a + (v - mean) ** 2, 0) / (e.length - 1))
      return `${sgn(mean)} ± ${fmt(sd / Math.sqrt(e.length))} (${e.length})`
    })])
  }
  const all = (m: typeof methods[number]) => [...rows[m], ...sweep.rows[m]]
  const gross = (m: typeof methods[number]) => all(m).filter(r => r.err !== null && Math.abs(r.err) > 50).length
  const found = (m: typeof methods[number]) => all(m).filter(r => r.err !== null).length
  table.push(['gross errors (> 50 ¢) among holds found (corpus + sweep)', '0', ...methods.map(m => String(gross(m)))])
  table.push(['holds found (corpus + sweep)', '≥ 99 %', ...methods.map(m => `${found(m)}/${all(m).length} (${(100 * found(m) / all(m).length).toFixed(1)} %)`)])
  table.push(['speed, 60-s take incl. decode (× real time, one core)', '≥ 150×', `${speed.engine.toFixed(0)}×`, `${speed.yin.toFixed(1)}×`, `${speed.mcleod.toFixed(1)}×`])
  table.push(['speed vs plain YIN', '≥ 15×', `${(speed.engine / speed.yin).toFixed(1)}×`, '1×', `${(speed.mcleod / speed.yin).toFixed(1)}×`])
  table.push(['engine speed over the whole corpus (× real time)', '—', `${(audioS / (engineCpu / 1000)).toFixed(0)}× (decode ${(100 * decodeCpu / engineCpu).toFixed(0)} % of it)`, '', ''])
  const widths = table[0]!.map((_, c) => Math.max(...table.map(r => [...r[c]!].length)))
  for (const [i, r] of table.entries()) {
    console.log(r.map((cell, c) => cell.padEnd(widths[c]!)).join(' | ').trimEnd())
    if (i === 0) console.log(widths.map(w => '-'.repeat(w)).join('-|-'))
  }
  const worst = rows.engine.filter(r => r.err !== null && r.truth.vibratoCents === 0).sort((p, q) => Math.abs(q.err!) - Math.abs(p.err!)).slice(0, 5)
  console.log('\nLargest engine errors without vibrato (take, frequency, SNR, wobble → error):')
  for (const r of worst) console.log(`  take ${r.truth.takeId}: ${r.truth.hz.toFixed(2)} Hz, SNR ${r.truth.snrDb} dB, ${r.truth.wobble ? 'wobble + drift' : 'steady'} → ${sgn(r.err!, 3)} ¢`)
  const worstVib = rows.engine.filter(r => r.err !== null && r.truth.vibratoCents > 0).sort((p, q) => Math.abs(q.err!) - Math.abs(p.err!)).slice(0, 5)
  console.log('Largest engine errors with vibrato (take, frequency, SNR, extent → error):')
  for (const r of worstVib) console.log(`  take ${r.truth.takeId}: ${r.truth.hz.toFixed(2)} Hz, SNR ${r.truth.snrDb} dB, ±${r.truth.vibratoCents.toFixed(0)} ¢${r.truth.wobble ? ', wobble + drift' : ''} → ${sgn(r.err!, 3)} ¢`)
  const missed = [...rows.engine, ...sweep.rows.engine].filter(r => r.err === null || Math.abs(r.err) > 50)
  if (missed.length) {
    console.log('\nEngine holds not found or grossly wrong:')
    for (const r of missed.slice(0, 20)) console.log(`  take ${r.truth.takeId}: ${r.truth.hz.toFixed(2)} Hz, SNR ${r.truth.snrDb} dB, vibrato ${r.truth.vibratoCents.toFixed(0)} ¢ → ${r.err === null ? 'not found' : sgn(r.err, 1) + ' ¢'}`)
  }
  if (!args['no-sampled']) {
    console.log('\nSampled instruments and voices: FluidSynth + TimGM6mb renders (scripts/sampled-corpus.ts); truth = aubiopitch on')
    console.log('each voice rendered alone (multi-comb, YIN where it slips an octave); Praat told each hold\'s steady window.')
    for (const line of await sampledTable(args.sampled!)) console.log(line)
  }
  console.log(`\nTotal benchmark time ${((Date.now() - t0) / 1000).toFixed(1)} s (CPU ${(cpuMs() / 1000).toFixed(1)} s).`)
}

async function speedRun (): Promise<{ engine: number, yin: number, mcleod: number }> {
  const rand = mulberry32(SEED + 1)
  const expected: ExpectedHold[] = []
  const holds: SynthHold[] = []
  const notes = [65, 67, 63, 62, 60, 58, 65, 69, 70, 67]
  let t = 0
  for (let i = 0; i < 20; i++) {
    const midi = notes[i % notes.length]!
    const hz = 440 * Math.pow(2, (midi - 69) / 12)
    expected.push({ index: i, startS: t, endS: t + 2.9, midi, expectedHz: hz })
    holds.push({ startS: 1.2 + t + 0.05, endS: 1.2 + t + 2.9 - 0.25, hz: hz * Math.pow(2, (rand() * 20 - 10) / 1200) })
    t += 2.9
  }
  const sr = 44100
  const durationS = 60
  const syn = synthTakeWithTruth({ sampleRate: sr, durationS, holds, timbre: 'voice-alto', snrDb: 30, seed: 99, vibrato: { rateHz: 5.5, extentCents: 20 }, jitterCents: 2, breaths: true })
  const wav = encodeWav(syn.samples, sr)
  const best = async (fn: () => Promise<void>, reps: number) => {
    let b = Infinity
    for (let i = 0; i < reps; i++) { const c = cpuMs(); await fn(); b = Math.min(b, cpuMs() - c) }
    return b
  }
  const eng = await best(async () => { const a = await decodeAudio(wav); measureTake(a, expected, { trace: false }) }, 5)
  const yin = await best(async () => { const a = await decodeAudio(wav); plainWholeFile(a.samples, a.sampleRate, 'yin') }, 1)
  const mpm = await best(async () => { const a = await decodeAudio(wav); plainWholeFile(a.samples, a.sampleRate, 'mcleod') }, 2)
  return { engine: durationS / (eng / 1000), yin: durationS / (yin / 1000), mcleod: durationS / (mpm / 1000) }
}

main().catch((e) => {
  console.error(e)
  process.exit(1)
})
