// A corpus of takes rendered from sampled instruments and voices, with known truth.
//
// Run:   npx tsx scripts/sampled-corpus.ts [--out DIR] [--fixtures]
// Needs: Debian's fluidsynth (2.3), timgm6mb-soundfont (/usr/share/sounds/sf2/TimGM6mb.sf2) and
//        aubio-tools (aubiopitch): apt-get install -y fluidsynth timgm6mb-soundfont aubio-tools
// Output: DIR (default storage/sampled-corpus/) holds one WAV per take and corpus.json (the takes,
//         their drills and the truth of every hold). --fixtures also writes the few small takes the
//         unit tests read to tests/fixtures/sampled/ (mono WAV) with truth.json, and stops.
//
// How the truth is known. Each take is a Standard MIDI File we write ourselves (1 tick = 1 ms):
// one channel per voice, the voice's program, and pitch-bend messages every 10 ms carrying the
// offsets we chose (per hold offset, drift over the take, the voice's detune and vibrato). The
// bend range is the General MIDI default ±2 semitones; every bend is a whole number of cents
// (FluidSynth turns pitch into whole cents anyway; renderBendCheck() measures what it really
// renders). A sampled note is not exactly at its equal-tempered pitch: every (program, note) used
// is rendered plain (no bend) and measured with aubiopitch (multi-comb, log-mean over its steady
// part) and recorded. FluidSynth works in whole cents of the note's absolute pitch, so a bend
// does not always sound as asked (+7 ¢ can come out +6 ¢): the truth of a hold is therefore
// measured on what was really rendered — each voice of the part rendered alone, aubiopitch's
// log-mean over the hold's steady window (onset + 0.35 s to release − 0.2 s, whole vibrato
// cycles), averaged over the voices (the mean of the voices' log-frequencies).
import { execFileSync } from 'node:child_process'
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs'
import { dirname, join, resolve } from 'node:path'
import { fileURLToPath } from 'node:url'
import { parseArgs } from 'node:util'
import { encodeWav } from '../server/analysis/wav'

export const SOUNDFONT = '/usr/share/sounds/sf2/TimGM6mb.sf2'
const RATE = 44100
const STEADY_AFTER_ON_S = 0.35
const STEADY_BEFORE_OFF_S = 0.2

// ---------- Standard MIDI File writer (format 0, 1000 ticks per quarter at 60 bpm = 1 ms per tick)
interface MidiEvent { tick: number, order: number, data: number[] }

function vlq (n: number): number[] {
  const out = [n & 0x7f]
  n >>= 7
  while (n > 0) { out.unshift((n & 0x7f) | 0x80); n >>= 7 }
  return out
}

export function writeSmf (events: MidiEvent[]): Uint8Array {
  const sorted = [...events].sort((a, b) => a.tick - b.tick || a.order - b.order)
  const body: number[] = [0x00, 0xff, 0x51, 0x03, 0x0f, 0x42, 0x40] // tempo 1 000 000 µs per quarter
  let last = 0
  for (const e of sorted) {
    body.push(...vlq(e.tick - last), ...e.data)
    last = e.tick
  }
  body.push(0x00, 0xff, 0x2f, 0x00)
  const head = [0x4d, 0x54, 0x68, 0x64, 0, 0, 0, 6, 0, 0, 0, 1, 0x03, 0xe8]
  const len = body.length
  return Uint8Array.from([...head, 0x4d, 0x54, 0x72, 0x6b, (len >>> 24) & 255, (len >>> 16) & 255, (len >>> 8) & 255, len & 255, ...body])
}

/** 14-bit bend value for whole cents at the ±2-semitone range (8192 per 200 ¢). */
function bendBytes (channel: number, cents: number): number[] {
  const v = Math.max(0, Math.min(16383, 8192 + Math.round(cents * 8192 / 200)))
  return [0xe0 | channel, v & 0x7f, v >> 7]
}

// ---------- take specifications
export type TakeKind = 'instrument' | 'voice' | 'section' | 'chord'

export interface VoiceSpec {
  program: number
  detuneCents: number
  vibrato: { rateHz: number, extentCents: number, phase: number } | null
  /** A singer's own slow wander (a sum of slow sinusoids, cents), independent of the other voices. */
  wander?: Array<{ rateHz: number, cents: number, phase: number }>
  /** Seconds this voice starts after the part's onset (singers of a section never start together). */
  startS?: number
}

export interface PartSpec {
  name: string
  /** MIDI note per chord (null = rest). */
  notes: Array<number | null>
  voices: VoiceSpec[]
}

export interface TakeSpec {
  id: string
  kind: TakeKind
  label: string
  tempo: number
  beats: number[]
  parts: PartSpec[]
  /** The part measured (the others sound with it in a chord take). */
  part: string
  /** Whole-cent offset per chord of the measured part's voices. */
  offsets: number[]
  driftCentsPerMin: number
  leadInS: number
  /** Late start of each chord's onset against the beat, seconds (after the lead-in). */
  lateS: number[]
  /** Repeated notes: 'rearticulate' (a new note-on), 'tie' (one note across the chords). */
  repeats: 'rearticulate' | 'tie'
  /** Silence between consecutive different notes, seconds. */
  gapS: number
  /** What the measured part really plays when it is not the drill's notes (wrong notes). */
  played?: Array<number | null>
  /** Render rate (default 44 100 Hz). */
  rate?: number
}

export interface HoldTruth {
  index: number
  midi: number
  onS: number
  offS: number
  steadyStartS: number
  steadyEndS: number
  truthHz: number
  /** Whole-cent bends asked for (mean over voices and the steady window). */
  askedCents: number
  /** The plain note's own mistuning (aubiopitch on a render without bend), mean over voices. */
  calibrationCents: number
  tied: boolean
}

export interface RenderedTake {
  spec: TakeSpec
  file: string
  durationS: number
  holds: HoldTruth[]
  /** Drift of the asked offsets over the holds' steady middles, cents per minute. */
  renderedDriftCentsPerMin: number
}

// Lines of a four-part chorale in C major (our own), with common tones held across chords.
const LINES: Record<string, number[]> = {
  S: [72, 72, 71, 72, 69, 69, 71, 72, 72, 74, 72, 72],
  A: [64, 65, 62, 64, 64, 62, 62, 64, 65, 65, 64, 64],
  T: [55, 57, 55, 55, 57, 57, 55, 55, 57, 59, 60, 55],
  B: [48, 53, 55, 48, 45, 50, 55, 48, 53, 55, 48, 48],
}
const BEATS = [2, 2, 3, 2, 2, 2, 3, 2, 2, 2, 2, 3]

function rng (seed: number) {
  let a = seed >>> 0
  return () => {
    a = (a + 0x6d2b79f5) >>> 0
    let t = a
    t = Math.imul(t ^ (t >>> 15), t | 1)
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61)
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296
  }
}

/** The corpus: our own choice of patches, offsets, drift, vibrato and late starts. */
export function corpusSpecs (): TakeSpec[] {
  const rand = rng(20261202)
  const uni = (lo: number, hi: number) => lo + (hi - lo) * rand()
  const offs = (n: number, spread: number) => Array.from({ length: n }, () => Math.round(uni(-spread, spread)))
  const late = (n: number, max: number) => Array.from({ length: n }, () => Math.round(uni(0, max) * 1000) / 1000)
  const shift = (line: number[], k: number) => line.map(m => m + k)
  const specs: TakeSpec[] = []
  const one = (id: string, kind: TakeKind, label: string, program: number, line: number[], o: Partial<TakeSpec> & { vibrato?: VoiceSpec['vibrato'] } = {}) => {
    specs.push({
      id, kind, label, tempo: o.tempo ?? 72, beats: BEATS, part: 'P',
      parts: [{ name: 'P', notes: line, voices: [{ program, detuneCents: 0, vibrato: o.vibrato ?? null }] }],
      offsets: o.offsets ?? offs(line.length, 15), driftCentsPerMin: o.driftCentsPerMin ?? 0,
      leadInS: o.leadInS ?? Math.round(uni(0.5, 2.5) * 100) / 100, lateS: o.lateS ?? late(line.length, 0.08),
      repeats: o.repeats ?? 'rearticulate', gapS: o.gapS ?? 0.12,
    })
  }
  // Instruments, one part at a time (GM programs, 0-based).
  one('trumpet', 'instrument', 'Trumpet (56), soprano line −1 oct', 56, shift(LINES.S!, -12))
  one('trombone', 'instrument', 'Trombone (57), tenor line −1 oct, drift −30 ¢/min', 57, shift(LINES.T!, -12), { driftCentsPerMin: -30 })
  one('horn', 'instrument', 'French horn (60), alto line −1 oct', 60, shift(LINES.A!, -12))
  one('tuba', 'instrument', 'Tuba (58), bass line −1 oct', 58, shift(LINES.B!, -12))
  one('clarinet', 'instrument', 'Clarinet (71), alto line, drift +20 ¢/min', 71, LINES.A!, { driftCentsPerMin: 20 })
  one('flute', 'instrument', 'Flute (73), soprano line +1 oct', 73, shift(LINES.S!, 12))
  one('oboe', 'instrument', 'Oboe (68), soprano line', 68, LINES.S!)
  one('bassoon', 'instrument', 'Bassoon (70), bass line', 70, LINES.B!)
  one('violin', 'instrument', 'Violin (40), soprano line, vibrato ±12 ¢', 40, LINES.S!, { vibrato: { rateHz: 5.8, extentCents: 12, phase: 0.3 } })
  one('cello', 'instrument', 'Cello (42), bass line, tied repeats', 42, LINES.B!, { repeats: 'tie' })
  // Voices (one singer).
  one('aahs-S', 'voice', 'Choir aahs (52), soprano line, vibrato ±20 ¢', 52, LINES.S!, { vibrato: { rateHz: 5.5, extentCents: 20, phase: 1.1 } })
  one('aahs-T', 'voice', 'Choir aahs (52), tenor line, drift −30 ¢/min', 52, LINES.T!, { driftCentsPerMin: -30 })
  one('oohs-A', 'voice', 'Voice oohs (53), alto line, legato repeats', 53, LINES.A!, { gapS: 0 })
  one('oohs-B', 'voice', 'Voice oohs (53), bass line, vibrato ±15 ¢', 53, LINES.B!, { vibrato: { rateHz: 5.0, extentCents: 15, phase: 2.0 } })
  // Sections: several voices on one part, each detuned a few cents with its own vibrato.
  const section = (id: string, label: string, program: number, line: number[], n: number, drift = 0) => {
    const voices: VoiceSpec[] = Array.from({ length: n }, () => ({
      program, detuneCents: Math.round(uni(-8, 8)),
      vibrato: { rateHz: Math.round(uni(4.6, 6.4) * 100) / 100, extentCents: Math.round(uni(8, 30)), phase: uni(0, 2 * Math.PI) },
    }))
    specs.push({
      id, kind: 'section', label, tempo: 66, beats: BEATS, part: 'P', parts: [{ name: 'P', notes: line, voices }],
      offsets: offs(line.length, 12), driftCentsPerMin: drift, leadInS: Math.round(uni(0.6, 2) * 100) / 100,
      lateS: late(line.length, 0.06), repeats: 'rearticulate', gapS: 0.1,
    })
  }
  section('section-A4', 'Choir aahs (52) ×4 voices, alto line', 52, LINES.A!, 4)
  section('section-T8', 'Choir aahs (52) ×8 voices, tenor line, drift −30 ¢/min', 52, LINES.T!, 8, -30)
  section('section-S3', 'Voice oohs (53) ×3 voices, soprano line', 53, LINES.S!, 3)
  section('section-B12', 'Choir aahs (52) ×12 voices, bass line', 52, LINES.B!, 12)
  // A whole chord: brass quartet, the second trumpet's part measured with the others sounding.
  {
    const parts: PartSpec[] = [
      { name: 'Tpt1', notes: LINES.S!.map(m => m - 12), voices: [{ program: 56, detuneCents: 0, vibrato: null }] },
      { name: 'Hn', notes: LINES.A!.map(m => m - 12), voices: [{ program: 60, detuneCents: 0, vibrato: null }] },
      { name: 'Tbn', notes: LINES.T!.map(m => m - 12), voices: [{ program: 57, detuneCents: 0, vibrato: null }] },
      { name: 'Tuba', notes: LINES.B!.map(m => m - 12), voices: [{ program: 58, detuneCents: 0, vibrato: null }] },
    ]
    for (const p of ['Hn', 'Tbn']) {
      specs.push({
        id: `quartet-${p}`, kind: 'chord', label: `Brass quartet, ${p} measured with all four sounding`, tempo: 72, beats: BEATS,
        part: p, parts, offsets: offs(12, 10), driftCentsPerMin: 0, leadInS: 1, lateS: late(12, 0.03), repeats: 'rearticulate', gapS: 0.1,
      })
    }
  }
  // Sections sung as a section sings: each voice starts up to 40 ms after the others and wanders
  // on its own by a cent or two, so no two voices keep a fixed phase between them. (Copies of one
  // sample started together at nearly the same pitch add coherently: their sum is louder or
  // softer than two voices by the chance of their phase, and no estimator weighs them as two.)
  // Their own generator keeps every take above as it was.
  const rand2 = rng(20261203)
  const uni2 = (lo: number, hi: number) => lo + (hi - lo) * rand2()
  const sung = (id: string, label: string, program: number, line: number[], n: number, drift = 0) => {
    const voices: VoiceSpec[] = Array.from({ length: n }, () => ({
      program, detuneCents: Math.round(uni2(-8, 8)),
      vibrato: { rateHz: Math.round(uni2(4.6, 6.4) * 100) / 100, extentCents: Math.round(uni2(8, 30)), phase: uni2(0, 2 * Math.PI) },
      wander: [0.31, 0.77, 1.43].map(rateHz => ({ rateHz: Math.round(rateHz * uni2(0.8, 1.25) * 100) / 100, cents: Math.round(uni2(0.5, 1.5) * 10) / 10, phase: uni2(0, 2 * Math.PI) })),
      startS: Math.round(uni2(0, 0.04) * 1000) / 1000,
    }))
    specs.push({
      id, kind: 'section', label, tempo: 66, beats: BEATS, part: 'P', parts: [{ name: 'P', notes: line, voices }],
      offsets: Array.from({ length: line.length }, () => Math.round(uni2(-12, 12))), driftCentsPerMin: drift,
      leadInS: Math.round(uni2(0.6, 2) * 100) / 100,
      lateS: Array.from({ length: line.length }, () => Math.round(uni2(0, 0.06) * 1000) / 1000), repeats: 'rearticulate', gapS: 0.1,
    })
  }
  sung('sung-S4', 'Voice oohs (53) ×4 voices, soprano line, own starts and wander', 53, LINES.S!, 4)
  sung('sung-T6', 'Voice oohs (53) ×6 voices, tenor line, own starts and wander, drift −30 ¢/min', 53, LINES.T!, 6, -30)
  sung('sung-A8', 'Choir aahs (52) ×8 voices, alto line, own starts and wander', 52, LINES.A!, 8)
  sung('sung-B12', 'Voice oohs (53) ×12 voices, bass line, own starts and wander', 53, LINES.B!, 12)
  // Takes that only drift (every chord on its target, the pitch sagging or rising steadily): with
  // offsets of ±12–15 ¢ per chord, as above, the drift is not separable from them over twelve holds,
  // and even the fit of the truths is uncertain.
  const drifting = (id: string, kind: TakeKind, label: string, program: number, line: number[], drift: number, voices = 1, vibrato: VoiceSpec['vibrato'] = null) => {
    specs.push({
      id, kind, label, tempo: 60, beats: BEATS, part: 'P',
      parts: [{
        name: 'P', notes: line, voices: Array.from({ length: voices }, (_, i) => ({
          program, detuneCents: voices > 1 ? Math.round(uni2(-6, 6)) : 0,
          vibrato: voices > 1 ? { rateHz: Math.round(uni2(4.6, 6.4) * 100) / 100, extentCents: Math.round(uni2(8, 24)), phase: uni2(0, 2 * Math.PI) } : vibrato,
          ...(voices > 1 ? { startS: i === 0 ? 0 : Math.round(uni2(0, 0.04) * 1000) / 1000 } : {}),
        })),
      }],
      offsets: line.map(() => 0), driftCentsPerMin: drift, leadInS: Math.round(uni2(0.6, 2) * 100) / 100,
      lateS: line.map(() => Math.round(uni2(0, 0.05) * 1000) / 1000), repeats: 'rearticulate', gapS: 0.1,
    })
  }
  drifting('drift-tbn', 'instrument', 'Trombone (57), tenor line −1 oct, drift −30 ¢/min only', 57, shift(LINES.T!, -12), -30)
  drifting('drift-cl', 'instrument', 'Clarinet (71), alto line, drift +20 ¢/min only', 71, LINES.A!, 20)
  drifting('drift-oohs', 'voice', 'Voice oohs (53), soprano line, vibrato ±12 ¢, drift −24 ¢/min only', 53, LINES.S!, -24, 1, { rateHz: 5.4, extentCents: 12, phase: 0.7 })
  drifting('drift-sung4', 'section', 'Voice oohs (53) ×4 voices, alto line, drift −30 ¢/min only', 53, LINES.A!, -30, 4)
  // Long tones: three of the sections above, the same voices, offsets and late starts, at half the
  // tempo (holds of 3–5 s, as a long-tone drill holds them). A section's centre carries a chance
  // error from its voices' beats that falls as the hold grows; these show how far.
  for (const id of ['sung-S4', 'sung-T6', 'sung-B12']) {
    const s = specs.find(x => x.id === id)!
    specs.push({ ...s, id: `${id}-long`, label: `${s.label}, long tones (33 bpm)`, tempo: 33 })
  }
  return specs
}

// ---------- rendering
interface Timed { onS: number, offS: number, midi: number, chords: number[] }

/** Notes of a part in take time: ties merge repeated notes when asked. */
function partNotes (spec: TakeSpec, part: PartSpec, late: boolean): Timed[] {
  const spb = 60 / spec.tempo
  const out: Timed[] = []
  const notes = part.name === spec.part && spec.played ? spec.played : part.notes
  let beat = 0
  spec.beats.forEach((b, i) => {
    const midi = notes[i] ?? null
    const start = spec.leadInS + beat * spb
    beat += b
    const end = spec.leadInS + beat * spb
    if (midi === null) return
    const prev = out[out.length - 1]
    const next = notes[i + 1] ?? null
    if (prev && prev.midi === midi && spec.repeats === 'tie' && Math.abs(prev.offS - start) < 1e-9) {
      prev.chords.push(i)
      prev.offS = end - (next === midi ? 0 : spec.gapS)
      return
    }
    const onS = start + (late ? spec.lateS[i] ?? 0 : 0)
    // Re-articulated repeats: note-off and the next note-on 30 ms apart (a tongued or sung re-attack).
    const offS = end - (next === midi ? 0.03 : spec.gapS)
    out.push({ onS, offS: spec.repeats === 'tie' && next === midi ? end : offS, midi, chords: [i] })
  })
  return out
}

/** One voice's own shape at take time t, cents (detune, vibrato and wander; not yet whole cents). */
export function voiceShapeCents (v: VoiceSpec, t: number): number {
  let c = v.detuneCents
  if (v.vibrato) c += v.vibrato.extentCents * Math.sin(2 * Math.PI * v.vibrato.rateHz * t + v.vibrato.phase)
  for (const w of v.wander ?? []) c += w.cents * Math.sin(2 * Math.PI * w.rateHz * t + w.phase)
  return c
}

/** The middle of [a, b] cut to whole cycles of a voice's vibrato (all of it without vibrato). */
export function wholeVibratoCycles (a: number, b: number, vibrato: VoiceSpec['vibrato']): { a: number, b: number } {
  if (!vibrato) return { a, b }
  const keep = Math.floor((b - a) * vibrato.rateHz) / vibrato.rateHz
  const from = (a + b) / 2 - keep / 2
  return { a: from, b: from + keep }
}

/** Whole-cent bend of one voice at take time t (offset of the chord sounding, drift, detune, vibrato). */
function voiceCents (spec: TakeSpec, v: VoiceSpec, t: number, measured: boolean): number {
  let c = voiceShapeCents(v, t)
  if (measured) {
    const spb = 60 / spec.tempo
    let beat = 0
    let idx = 0
    for (let i = 0; i < spec.beats.length; i++) {
      if (t >= spec.leadInS + beat * spb) idx = i
      beat += spec.beats[i]!
    }
    c += spec.offsets[idx] ?? 0
    c += spec.driftCentsPerMin * Math.max(0, t - spec.leadInS) / 60
  }
  return Math.round(c)
}

function takeEnd (spec: TakeSpec): number {
  return spec.leadInS + spec.beats.reduce((s, b) => s + b, 0) * 60 / spec.tempo
}

/** The take as MIDI; `solo` keeps one voice of the measured part only (same channel and events). */
function specToMidi (spec: TakeSpec, solo: number | null = null): Uint8Array {
  const events: MidiEvent[] = []
  let channel = 0
  const end = takeEnd(spec)
  for (const part of spec.parts) {
    const measured = part.name === spec.part
    for (const [vi, v] of part.voices.entries()) {
      if (solo !== null && (!measured || vi !== solo)) { if (channel === 9) channel++; channel++; continue }
      // Channel 10 (index 9) is General MIDI's percussion channel: skip it.
      if (channel === 9) channel++
      const ch = channel++
      if (ch > 15) throw new Error('more than 15 voices in one take')
      events.push({ tick: 0, order: 0, data: [0xc0 | ch, v.program] })
      // Bend range ±2 semitones (RPN 0), stated rather than assumed.
      events.push({ tick: 0, order: 1, data: [0xb0 | ch, 101, 0] })
      events.push({ tick: 0, order: 1, data: [0xb0 | ch, 100, 0] })
      events.push({ tick: 0, order: 1, data: [0xb0 | ch, 6, 2] })
      events.push({ tick: 0, order: 1, data: [0xb0 | ch, 38, 0] })
      // Sections: each voice a little quieter so the sum stays below full scale.
      events.push({ tick: 0, order: 1, data: [0xb0 | ch, 7, Math.round(110 / Math.sqrt(Math.max(1, part.voices.length)))] })
      let lastBend = NaN
      for (let ms = 0; ms <= Math.round(end * 1000) + 500; ms += 10) {
        const c = voiceCents(spec, v, ms / 1000, measured)
        if (c !== lastBend) { events.push({ tick: ms, order: 2, data: bendBytes(ch, c) }); lastBend = c }
      }
      for (const n of partNotes(spec, part, measured)) {
        events.push({ tick: Math.round((n.onS + (v.startS ?? 0)) * 1000), order: 4, data: [0x90 | ch, n.midi, 100] })
        events.push({ tick: Math.round(n.offS * 1000), order: 3, data: [0x80 | ch, n.midi, 0] })
      }
    }
  }
  return writeSmf(events)
}

function render (midiBytes: Uint8Array, wavPath: string, work: string, rate = RATE) {
  const mid = `${wavPath}.mid`
  writeFileSync(mid, midiBytes)
  execFileSync('fluidsynth', ['-ni', '-q', '-g', '0.6', '-r', String(rate), '-F', wavPath, '-T', 'wav', SOUNDFONT, mid], { cwd: work, stdio: ['ignore', 'ignore', 'pipe'] })
}

/**
 * aubiopitch over a file: [seconds, Hz] frames. Multi-comb with 4096-sample frames: on steady
 * harmonic tones of known pitch (55–1050 Hz) its log-mean is within 0.001 ¢, where YIN-FFT with
 * 2048-sample frames reads up to 15 ¢ sharp at 55 Hz; plain YIN is within 0.01 ¢ below 300 Hz
 * (0.5 ¢ sharp at 1 kHz) and stands in where multi-comb slips an octave (low notes). The silence
 * gate is lowered to −120 dB: one voice of a twelve-voice section, rendered alone at its share of
 * the level, peaks near −40 dBFS and aubiopitch's default gate reports it as silence.
 */
export function aubioTrack (wavPath: string, method = 'mcomb', buf = '4096'): Array<[number, number]> {
  const out = execFileSync('aubiopitch', ['-i', wavPath, '-p', method, '-B', buf, '-H', '256', '-u', 'Hz', '-s', '-120'], { encoding: 'utf8', maxBuffer: 64 << 20, stdio: ['ignore', 'pipe', 'ignore'] })
  return out.trim().split('\n').map(l => l.trim().split(/\s+/).map(Number) as [number, number]).filter(([, f]) => f > 0)
}

/** Both aubiopitch tracks of a file, each run only when first needed: multi-comb first, plain YIN
 *  (an O(N²) search per frame, by far the slower) only where multi-comb slips an octave. */
export function aubioTracks (wavPath: string): Array<() => Array<[number, number]>> {
  const lazy = (method: string) => {
    let track: Array<[number, number]> | null = null
    return () => (track ??= aubioTrack(wavPath, method, '4096'))
  }
  return [lazy('mcomb'), lazy('yin')]
}

/** logMean over the first of `tracks` that has enough frames near the note. */
export function logMeanOf (tracks: Array<() => Array<[number, number]>>, a: number, b: number, nearHz: number): number {
  for (const [i, tr] of tracks.entries()) {
    try { return logMean(tr(), a, b, nearHz) } catch (e) { if (i === tracks.length - 1) throw e }
  }
  throw new Error('no aubiopitch track')
}

/** Log-mean of the frames within ±60 ¢ of `nearHz` between a and b (octave slips left out). */
export function logMean (track: Array<[number, number]>, a: number, b: number, nearHz: number): number {
  let s = 0
  let n = 0
  for (const [t, f] of track) {
    if (t < a || t > b) continue
    const c = 1200 * Math.log2(f / nearHz)
    if (Math.abs(c) > 60) continue
    s += c
    n++
  }
  if (n < 10) throw new Error(`calibration: too few frames near ${nearHz.toFixed(2)} Hz`)
  return nearHz * Math.pow(2, s / n / 1200)
}

const etHz = (midi: number) => 440 * Math.pow(2, (midi - 69) / 12)

/** Calibration of one sampled note: cents of its plain render from equal temperament (aubiopitch). */
function calibrate (program: number, midi: number, dir: string, cache: Record<string, number>): number {
  const key = `${program}:${midi}`
  if (cache[key] !== undefined) return cache[key]!
  const events: MidiEvent[] = [
    { tick: 0, order: 0, data: [0xc0, program] },
    { tick: 200, order: 4, data: [0x90, midi, 100] },
    { tick: 3200, order: 3, data: [0x80, midi, 0] },
  ]
  const wav = join(dir, `cal-${program}-${midi}.wav`)
  render(writeSmf(events), wav, dir)
  const hz = logMeanOf(aubioTracks(wav), 0.7, 2.9, etHz(midi))
  cache[key] = Math.round(1200 * Math.log2(hz / etHz(midi)) * 1000) / 1000
  return cache[key]!
}

/**
 * Renders one take and works out the truth of every hold of its measured part. Besides the take,
 * each voice of the measured part is rendered alone (same channel, program and bends) and
 * measured with aubiopitch over each hold's steady window (cut to whole vibrato cycles of that
 * voice): FluidSynth renders bends to whole cents of the note's absolute pitch, so a bend of
 * +7 ¢ can sound as +6 ¢ (see renderBendCheck), and the isolated voice is the only honest
 * reference. The truth is the mean over the voices of those log-frequencies.
 */
function renderTake (spec: TakeSpec, dir: string, cal: Record<string, number>): RenderedTake {
  const file = join(dir, `${spec.id}.wav`)
  render(specToMidi(spec), file, dir, spec.rate)
  const part = spec.parts.find(p => p.name === spec.part)!
  const soloTracks = part.voices.map((_, vi) => {
    const wav = join(dir, `${spec.id}.solo${vi}.wav`)
    render(specToMidi(spec, vi), wav, dir, spec.rate)
    return aubioTracks(wav)
  })
  const holds: HoldTruth[] = []
  const spb = 60 / spec.tempo
  const starts: number[] = []
  let beat = 0
  for (const b of spec.beats) { starts.push(spec.leadInS + beat * spb); beat += b }
  starts.push(spec.leadInS + beat * spb)
  for (const n of partNotes(spec, part, true)) {
    for (const ci of n.chords) {
      // A tied note is one sound over several chords: each chord's share is its own hold.
      const on = n.chords.length > 1 ? Math.max(n.onS, starts[ci]!) : n.onS
      const off = n.chords.length > 1 ? Math.min(n.offS, starts[ci + 1]!) : n.offS
      const a = on + STEADY_AFTER_ON_S
      const b = off - STEADY_BEFORE_OFF_S
      let asked = 0
      let cnt = 0
      for (let t = a; t <= b; t += 0.001) {
        for (const v of part.voices) { asked += voiceCents(spec, v, t, true); cnt++ }
      }
      let heard = 0
      part.voices.forEach((v, vi) => {
        const w = wholeVibratoCycles(a, b, v.vibrato)
        heard += 1200 * Math.log2(logMeanOf(soloTracks[vi]!, w.a, w.b, etHz(n.midi) * Math.pow(2, voiceCents(spec, v, (a + b) / 2, true) / 1200)) / etHz(n.midi))
      })
      heard /= part.voices.length
      const calMean = part.voices.reduce((s, v) => s + calibrate(v.program, n.midi, dir, cal), 0) / part.voices.length
      holds.push({
        index: ci, midi: n.midi, onS: on, offS: off, steadyStartS: a, steadyEndS: b,
        truthHz: etHz(n.midi) * Math.pow(2, heard / 1200), askedCents: asked / cnt, calibrationCents: calMean, tied: n.chords.length > 1,
      })
    }
  }
  const ts = holds.map(h => (h.steadyStartS + h.steadyEndS) / 2 / 60)
  const ys = holds.map(h => h.askedCents)
  const tm = ts.reduce((s, v) => s + v, 0) / ts.length
  const ym = ys.reduce((s, v) => s + v, 0) / ys.length
  let sxx = 0
  let sxy = 0
  ts.forEach((t, i) => { sxx += (t - tm) ** 2; sxy += (t - tm) * (ys[i]! - ym) })
  return { spec, file, durationS: takeEnd(spec) + 1.5, holds, renderedDriftCentsPerMin: spec.driftCentsPerMin === 0 ? 0 : sxy / sxx }
}

/**
 * What FluidSynth really renders for whole-cent bends: a plain note and the same note bent by
 * +7, +10 and −13 ¢, measured with aubiopitch. Returns the measured bends (cents).
 */
export function renderBendCheck (dir: string): Array<{ asked: number, measured: number }> {
  const out: Array<{ asked: number, measured: number }> = []
  const plainWav = join(dir, 'bend-0.wav')
  const note = (bend: number) => writeSmf([
    { tick: 0, order: 0, data: [0xc0, 56] },
    { tick: 0, order: 1, data: bendBytes(0, bend) },
    { tick: 200, order: 4, data: [0x90, 60, 100] },
    { tick: 3200, order: 3, data: [0x80, 60, 0] },
  ])
  render(note(0), plainWav, dir)
  const base = logMeanOf(aubioTracks(plainWav), 0.7, 2.9, etHz(60))
  for (const asked of [7, 10, -13]) {
    const wav = join(dir, `bend-${asked}.wav`)
    render(note(asked), wav, dir)
    const hz = logMeanOf(aubioTracks(wav), 0.7, 2.9, etHz(60) * Math.pow(2, asked / 1200))
    out.push({ asked, measured: Math.round(1200 * Math.log2(hz / base) * 1000) / 1000 })
  }
  return out
}

/** Renders the whole corpus into `dir` (reusing it when the specs and renders are unchanged). */
export function buildSampledCorpus (dirIn: string, specs = corpusSpecs()): { takes: RenderedTake[], calibration: Record<string, number>, bendCheck: Array<{ asked: number, measured: number }> } {
  // FluidSynth runs with the corpus folder as its working directory: relative paths would be resolved twice.
  const dir = resolve(dirIn)
  mkdirSync(dir, { recursive: true })
  const index = join(dir, 'corpus.json')
  const fingerprint = JSON.stringify(specs)
  if (existsSync(index)) {
    const old = JSON.parse(readFileSync(index, 'utf8'))
    if (old.fingerprint === fingerprint && old.takes.every((t: RenderedTake) => existsSync(t.file))) return old
  }
  const calibration: Record<string, number> = {}
  const takes = specs.map(s => renderTake(s, dir, calibration))
  const bendCheck = renderBendCheck(dir)
  writeFileSync(index, JSON.stringify({ fingerprint, takes, calibration, bendCheck }, null, 1))
  return { takes, calibration, bendCheck }
}

/** The tools the corpus needs, or the first one missing. */
export function missingTool (): string | null {
  if (!existsSync(SOUNDFONT)) return `the soundfont ${SOUNDFONT} (Debian package timgm6mb-soundfont)`
  for (const [cmd, pkg] of [['fluidsynth', 'fluidsynth'], ['aubiopitch', 'aubio-tools']] as const) {
    try { execFileSync(cmd, ['--help'], { stdio: 'ignore' }) } catch (e) {
      if ((e as NodeJS.ErrnoException).code === 'ENOENT') return `${cmd} (Debian package ${pkg})`
    }
  }
  return null
}

const root = join(dirname(fileURLToPath(import.meta.url)), '..')

/** The small takes the unit tests read (16 kHz, mono 16-bit WAV, 300–500 kB each): a trumpet line with a wrong note
 *  and a tied repeat, a sung line (voice oohs) with vibrato and a note an octave low, a low sung line with vibrato (one
 *  singer), a five-voice section on one part, four singers with repeated notes under their beats, and a brass quartet sounding together with one part measured. */
export function fixtureSpecs (): TakeSpec[] {
  const beats = [2, 2, 2, 2, 2, 2]
  return [
    {
      id: 'trumpet-wrong-tie', kind: 'instrument', label: 'Trumpet (56): chord 3 played three semitones high, chords 5–6 tied',
      tempo: 90, beats, part: 'P', parts: [{ name: 'P', notes: [60, 62, 64, 65, 67, 67], voices: [{ program: 56, detuneCents: 0, vibrato: null }] }],
      played: [60, 62, 67, 65, 67, 67], offsets: [5, -8, 0, 12, -4, 6], driftCentsPerMin: 0, leadInS: 0.8, lateS: [0.02, 0.05, 0, 0.03, 0.06, 0],
      repeats: 'tie', gapS: 0.1, rate: 16000,
    },
    {
      id: 'oohs-octave', kind: 'voice', label: 'Voice oohs (53) with vibrato ±15 ¢: chord 4 sung an octave low',
      tempo: 80, beats, part: 'P', parts: [{ name: 'P', notes: [64, 65, 67, 69, 67, 64], voices: [{ program: 53, detuneCents: 0, vibrato: { rateHz: 5.4, extentCents: 15, phase: 0.5 } }] }],
      played: [64, 65, 67, 57, 67, 64], offsets: [-6, 3, 9, 0, -11, 4], driftCentsPerMin: 0, leadInS: 1.1, lateS: [0.04, 0, 0.07, 0.02, 0.05, 0.01],
      repeats: 'rearticulate', gapS: 0.12, rate: 16000,
    },
    {
      id: 'section-aahs-5', kind: 'section', label: 'Choir aahs (52) ×5 voices, each detuned and with its own vibrato; a repeated E4',
      tempo: 72, beats: [3, 3, 3, 3, 3], part: 'P',
      parts: [{
        name: 'P', notes: [64, 65, 62, 64, 64],
        voices: [
          { program: 52, detuneCents: -7, vibrato: { rateHz: 4.8, extentCents: 12, phase: 0.4 } },
          { program: 52, detuneCents: -2, vibrato: { rateHz: 5.3, extentCents: 22, phase: 2.1 } },
          { program: 52, detuneCents: 1, vibrato: { rateHz: 5.9, extentCents: 9, phase: 4.0 } },
          { program: 52, detuneCents: 4, vibrato: { rateHz: 6.2, extentCents: 26, phase: 5.2 } },
          { program: 52, detuneCents: 7, vibrato: { rateHz: 5.5, extentCents: 15, phase: 1.3 } },
        ],
      }],
      offsets: [5, -9, 3, 11, -4], driftCentsPerMin: 0, leadInS: 0.9, lateS: [0.03, 0, 0.05, 0.02, 0.04],
      repeats: 'rearticulate', gapS: 0.1, rate: 16000,
    },
    {
      // Four singers on one part (voice oohs): each detuned, with its own vibrato and its own slow
      // wander, each starting a few milliseconds apart as a section does.
      id: 'section-oohs-4', kind: 'section', label: 'Voice oohs (53) ×4 voices, own detune, vibrato, wander and start',
      tempo: 72, beats: [3, 3, 3, 3, 3], part: 'P',
      parts: [{
        name: 'P', notes: [67, 69, 65, 67, 72],
        voices: [
          { program: 53, detuneCents: -6, vibrato: { rateHz: 5.1, extentCents: 14, phase: 0.9 }, wander: [{ rateHz: 0.37, cents: 1.2, phase: 0.2 }, { rateHz: 0.83, cents: 0.8, phase: 2.5 }], startS: 0.012 },
          { program: 53, detuneCents: 5, vibrato: { rateHz: 5.7, extentCents: 22, phase: 3.1 }, wander: [{ rateHz: 0.29, cents: 1.4, phase: 4.0 }, { rateHz: 0.91, cents: 0.6, phase: 1.1 }], startS: 0 },
          { program: 53, detuneCents: -1, vibrato: { rateHz: 6.1, extentCents: 10, phase: 5.0 }, wander: [{ rateHz: 0.41, cents: 0.9, phase: 3.3 }, { rateHz: 1.27, cents: 0.7, phase: 0.4 }], startS: 0.031 },
          { program: 53, detuneCents: 3, vibrato: { rateHz: 4.8, extentCents: 18, phase: 1.7 }, wander: [{ rateHz: 0.33, cents: 1.1, phase: 5.6 }, { rateHz: 0.77, cents: 1.0, phase: 2.9 }], startS: 0.022 },
        ],
      }],
      offsets: [-4, 7, 2, -9, 5], driftCentsPerMin: 0, leadInS: 0.8, lateS: [0.02, 0.04, 0, 0.03, 0.01],
      repeats: 'rearticulate', gapS: 0.1, rate: 16000,
    },
    {
      // Four singers (voice oohs) whose beats dip the level by up to about 20 dB within a hold,
      // while a repeated note's re-strike, under the patch's slow release, shows no dip of its own:
      // two repeated E4s, a steady drift, each voice with its own detune, vibrato and start.
      id: 'section-oohs-repeats', kind: 'section', label: 'Voice oohs (53) ×4 voices at 60 bpm: repeated notes re-struck under the beats, drift −30 ¢/min',
      tempo: 60, beats: [3, 2, 2, 2, 2, 3], part: 'P',
      parts: [{
        name: 'P', notes: [62, 64, 64, 65, 64, 64],
        voices: [
          { program: 53, detuneCents: 4, vibrato: { rateHz: 4.71, extentCents: 9, phase: 2.95 }, startS: 0 },
          { program: 53, detuneCents: 2, vibrato: { rateHz: 5.97, extentCents: 12, phase: 0.86 }, startS: 0.038 },
          { program: 53, detuneCents: -3, vibrato: { rateHz: 4.71, extentCents: 13, phase: 3.17 }, startS: 0.012 },
          { program: 53, detuneCents: -4, vibrato: { rateHz: 5.5, extentCents: 11, phase: 5.47 }, startS: 0.037 },
        ],
      }],
      offsets: [0, 0, 0, 0, 0, 0], driftCentsPerMin: -30, leadInS: 1, lateS: [0.02, 0.02, 0.017, 0.005, 0.021, 0.012],
      repeats: 'rearticulate', gapS: 0.1, rate: 16000,
    },
    {
      // Six singers (voice oohs) on long tones of 4.5 s, as a long-tone drill holds them: each voice
      // with its own detune, vibrato, slow wander and start.
      id: 'section-oohs-long', kind: 'section', label: 'Voice oohs (53) ×6 voices, long tones (40 bpm, 3 beats each)',
      tempo: 40, beats: [3, 3, 3, 3, 3], part: 'P',
      parts: [{
        name: 'P', notes: [55, 57, 53, 55, 60],
        voices: [
          { program: 53, detuneCents: 5, vibrato: { rateHz: 5.3, extentCents: 16, phase: 0.4 }, wander: [{ rateHz: 0.31, cents: 1.0, phase: 1.9 }, { rateHz: 0.88, cents: 0.7, phase: 4.2 }], startS: 0.018 },
          { program: 53, detuneCents: -4, vibrato: { rateHz: 5.9, extentCents: 11, phase: 2.2 }, wander: [{ rateHz: 0.36, cents: 1.3, phase: 0.6 }, { rateHz: 1.12, cents: 0.5, phase: 3.0 }], startS: 0 },
          { program: 53, detuneCents: 1, vibrato: { rateHz: 4.9, extentCents: 24, phase: 4.6 }, wander: [{ rateHz: 0.27, cents: 0.8, phase: 5.1 }, { rateHz: 0.79, cents: 0.9, phase: 1.4 }], startS: 0.027 },
          { program: 53, detuneCents: -7, vibrato: { rateHz: 6.2, extentCents: 9, phase: 1.3 }, wander: [{ rateHz: 0.44, cents: 1.1, phase: 2.7 }, { rateHz: 0.95, cents: 0.6, phase: 5.9 }], startS: 0.009 },
          { program: 53, detuneCents: 3, vibrato: { rateHz: 5.5, extentCents: 19, phase: 3.8 }, wander: [{ rateHz: 0.33, cents: 1.4, phase: 0.2 }, { rateHz: 1.21, cents: 0.4, phase: 4.8 }], startS: 0.035 },
          { program: 53, detuneCents: -2, vibrato: { rateHz: 5.0, extentCents: 14, phase: 5.5 }, wander: [{ rateHz: 0.39, cents: 0.9, phase: 3.6 }, { rateHz: 0.84, cents: 0.8, phase: 0.9 }], startS: 0.014 },
        ],
      }],
      offsets: [6, -8, 3, -5, 9], driftCentsPerMin: 0, leadInS: 0.9, lateS: [0.03, 0.01, 0.04, 0, 0.02],
      repeats: 'rearticulate', gapS: 0.1, rate: 16000,
    },
    {
      id: 'oohs-bass-vibrato', kind: 'voice', label: 'Voice oohs (53), one singer, low line with vibrato ±15 ¢ at 5 Hz',
      tempo: 72, beats, part: 'P', parts: [{ name: 'P', notes: [48, 53, 55, 48, 45, 48], voices: [{ program: 53, detuneCents: 0, vibrato: { rateHz: 5.0, extentCents: 15, phase: 2.0 } }] }],
      offsets: [4, -7, 10, -2, 6, -9], driftCentsPerMin: 0, leadInS: 0.7, lateS: [0.01, 0.04, 0, 0.02, 0.05, 0.03],
      repeats: 'rearticulate', gapS: 0.12, rate: 16000,
    },
    {
      id: 'quartet-horn', kind: 'chord', label: 'Brass quartet (trumpet 56, horn 60, trombone 57, tuba 58) all sounding; the horn part measured',
      tempo: 80, beats, part: 'Hn',
      parts: [
        { name: 'Tpt', notes: [60, 60, 59, 60, 57, 57], voices: [{ program: 56, detuneCents: 0, vibrato: null }] },
        { name: 'Hn', notes: [52, 53, 50, 52, 52, 50], voices: [{ program: 60, detuneCents: 0, vibrato: null }] },
        { name: 'Tbn', notes: [43, 45, 43, 43, 45, 45], voices: [{ program: 57, detuneCents: 0, vibrato: null }] },
        { name: 'Tuba', notes: [36, 41, 43, 36, 33, 38], voices: [{ program: 58, detuneCents: 0, vibrato: null }] },
      ],
      offsets: [6, -8, 4, -3, 9, -5], driftCentsPerMin: 0, leadInS: 1, lateS: [0.02, 0, 0.03, 0.01, 0.02, 0],
      repeats: 'rearticulate', gapS: 0.1, rate: 16000,
    },
    {
      // The trombone between a horn a sixth above and a tuba a third below (chords 1–2: their
      // partials sit half-way between the trombone's harmonics), at the unison with the tuba
      // (chord 3) and doubled by it an octave below (chord 4).
      id: 'quartet-trombone', kind: 'chord', label: 'Brass quartet (trumpet 56, horn 60, trombone 57, tuba 58) all sounding; the trombone part measured',
      tempo: 80, beats: [2, 3, 2, 2, 3, 2], part: 'Tbn',
      parts: [
        { name: 'Tpt', notes: [60, 62, 59, 57, 60, 60], voices: [{ program: 56, detuneCents: 0, vibrato: null }] },
        { name: 'Hn', notes: [53, 53, 50, 52, 52, 52], voices: [{ program: 60, detuneCents: 0, vibrato: null }] },
        { name: 'Tbn', notes: [45, 47, 43, 45, 43, 43], voices: [{ program: 57, detuneCents: 0, vibrato: null }] },
        { name: 'Tuba', notes: [41, 43, 43, 33, 36, 36], voices: [{ program: 58, detuneCents: 0, vibrato: null }] },
      ],
      offsets: [-7, 5, 3, -4, 8, -2], driftCentsPerMin: 0, leadInS: 0.9, lateS: [0.01, 0.03, 0, 0.02, 0, 0.01],
      repeats: 'rearticulate', gapS: 0.1, rate: 16000,
    },
  ]
}

/** Renders the fixtures into tests/fixtures/sampled/ (mono WAV from our own encoder) with their truth. */
function writeFixtures () {
  const out = join(root, 'tests', 'fixtures', 'sampled')
  const work = join(root, 'storage', 'sampled-fixtures')
  mkdirSync(out, { recursive: true })
  const built = buildSampledCorpus(work, fixtureSpecs())
  const takes = built.takes.map((t) => {
    const name = `${t.spec.id}.wav`
    writeFileSync(join(out, name), encodeWav(monoSamples(readFileSync(t.file)), t.spec.rate ?? RATE))
    return { ...t, file: `${t.spec.id}.wav` }
  })
  const fluid = execFileSync('fluidsynth', ['--version'], { encoding: 'utf8' }).split('\n')[0]
  writeFileSync(join(out, 'truth.json'), `${JSON.stringify({
    made: { renderer: fluid, soundfont: 'TimGM6mb.sf2 (Debian timgm6mb-soundfont)', truth: 'aubiopitch (aubio-tools), multi-comb / YIN, each voice rendered alone' },
    takes, calibration: built.calibration, bendCheck: built.bendCheck,
  }, null, 1)}\n`)
}

/** A 16-bit WAV from FluidSynth as mono samples (the average of the channels). */
function monoSamples (wav: Buffer): Float32Array {
  let p = 12
  let ch = 2
  while (p + 8 <= wav.length) {
    const id = wav.toString('ascii', p, p + 4)
    const size = wav.readUInt32LE(p + 4)
    if (id === 'fmt ') ch = wav.readUInt16LE(p + 10)
    if (id === 'data') {
      const frames = Math.floor(size / (2 * ch))
      const out = new Float32Array(frames)
      for (let i = 0; i < frames; i++) {
        let v = 0
        for (let c = 0; c < ch; c++) v += wav.readInt16LE(p + 8 + 2 * (i * ch + c))
        out[i] = v / ch / 32768
      }
      return out
    }
    p += 8 + size + (size & 1)
  }
  throw new Error('no data chunk')
}

if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
  const { values } = parseArgs({ options: { out: { type: 'string' }, fixtures: { type: 'boolean', default: false } } })
  const missing = missingTool()
  if (missing) { console.error(`sampled corpus: ${missing} is not installed`); process.exit(1) }
  if (values.fixtures) {
    writeFixtures()
    console.log('fixtures written to tests/fixtures/sampled/')
    process.exit(0)
  }
  const dir = values.out ?? join(root, 'storage', 'sampled-corpus')
  const c = buildSampledCorpus(dir)
  console.log(`${c.takes.length} takes, ${c.takes.reduce((s, t) => s + t.holds.length, 0)} holds in ${dir}`)
  console.log(`bend check (asked → measured ¢): ${c.bendCheck.map(b => `${b.asked} → ${b.measured}`).join(', ')}`)
}
