// measureTake: decoded audio + the part's expected holds → a Measurement (Hz, not cents from any
// target). Coarse track and alignment find each hold; the harmonic-phase track measures it; the
// steady-state statistics below turn the track into one centre per hold.
//
// Rules this module keeps (documented because a director acts on them):
// - Wrong notes: a steady centre more than 50 ¢ (about half a semitone) from the expected
//   note's equal-tempered pitch is a wrong note (wrong_note). Its pitch is measured like any
//   other hold and kept in detectedHz so the report can say which note was heard, but it is
//   never a tuning deviation. The same rule applies wherever the hold was found: placed by the
//   alignment, or left unplaced because what sounded there was a clearly different note.
// - Octave guard: the coarse detector's octave is checked against the harmonics. A hold played
//   or sung an octave off is a wrong note measured at the octave heard, never a 1200 ¢ deviation.
// - Steady part: the main plateau of the hold (within 100 ¢ of its median), attack trimmed by
//   12 % of its length (0.18–0.3 s) and release by 6 % (0.08–0.2 s), then extended past any
//   settling transient still visible (smoothed residual > max(4 ¢, 3 SD)), at most 0.4 s more.
//   Short holds get shorter trims (≥ 50 / 40 ms); 0.15 s of steady sound is the minimum,
//   otherwise too_short.
// - Spread: RMS about the centre of the pitch averaged over one vibrato period (0.2 s without
//   vibrato), trend included: how unsteady the hold is, vibrato and noise excluded.
// - Centre: robust (Huber) regression of the cents track on a constant, a linear trend and, when
//   vibrato is found, a sinusoid at its rate, over a whole number of vibrato cycles; the
//   constant at the window centre is the hold centre (= mean log-frequency of the steady part).
// - Several voices (a section recorded together): when the harmonics' spread about their moving
//   centre is 8 ¢ or more (one voice shows a few cents at most) and the pitch track wanders by
//   2.6 ¢ or more once vibrato is removed (the beats hand it from voice to voice), the centre is
//   the mean of the harmonics' power-weighted frequencies over the steady part, one vote per
//   harmonic heard (voices.ts), which beats do not scramble, its SE comes from four block centres
//   and the harmonics' disagreement, and the hold reports the voices' spread (voiceSpreadCents).
//   One voice: voiceSpreadCents null.
// - SE of the centre: the larger of the four-block SE above and the harmonics' disagreement
//   (1.4826 × MAD of each harmonic's own centre / √n, voices.ts harmonicMedian): a tone
//   whose partials are not quite harmonic has a pitch that depends on the harmonics heard.
// - Confidence (0–1) = usable share (steady length against half the chord, full from 50 %)
//   × harmonicity ((h − 0.5)/0.4, clamped) × 1/(1 + (spread/15 ¢)²) (one voice only: beats are
//   not unsteadiness) × 1/(1 + (SE/1 ¢)²) × length (full from 0.4 s) × 0.9 when clipping was seen.
// - A part inside a sounding chord (a quartet recorded together, the take measuring one part):
//   when the free pitch search measures fewer than 60 % of the holds, each expected note's own
//   harmonic series is searched for (pitch.ts chordTracks, ±100 ¢ of the note) and that pass is
//   kept only when it measures clearly more holds than the free pass, and more than the free pass
//   measured plus the wrong notes it heard at one distance (a take in a wrong key or octave stays
//   wrong notes; noise stays no_holds). Its time map comes from the whole chord's onsets
//   (timing.ts mapFromOnsets: every part moves at a chord change, and the take's sound extent
//   rules out a map one chord late or early), not from the part's own few; under it each hold
//   stays on its own chord (±0.15 s: never shifted onto a neighbour, a repeated note is split
//   there), a frame where its series does not stand out counts little against it (0.2, not 0.8),
//   and it is measured from its own onset when one was found (before it sounds the chord before).
//   Its holds are refined with long frames (16 periods), no
//   octave guard and no voice spread (other parts' partials); a hold that does not show its own
//   fundamental is not this part's note (no_pitch); the centre is the median of
//   the harmonics' own centres (voices.ts harmonicMedian: a harmonic another part sounds on is
//   pulled aside, the median follows the clear ones) and their disagreement is its SE; the
//   confidence is at most 0.6 (a partial of another part on the same harmonic cannot always be
//   told apart), and the take warns 'whole_chord'.
// - Clipping: more than 5 % of the sounding samples at full scale is an error ('clipped': the
//   recording level was far too high); 0.1–5 % is a warning and lowers confidence slightly.
// - Digital silence (peak below −80 dBFS) or no pitched frame anywhere → 'silent'; sound but
//   not one hold found nor any octave/wrong-note finding → 'no_holds'; a part that only rests →
//   'no_holds'.
import { AnalysisError } from './errors'
import type { DecodedAudio } from './decode'
import { Pyramid, median, quantile } from './dsp'
import { alignHolds, boundaryFrames } from './align'
import { findOnsets, fitTimeMap, holdTiming, mapFromOnsets } from './timing'
import type { TimeMap } from './timing'
import { chordTracks, coarseTrack, noteBands, octaveEvidence, refinePitch, subOctaveEvidence } from './pitch'
import type { CoarseTrack, RefinedTrack } from './pitch'
import { ENGINE_VERSION, WRONG_NOTE_CENTS } from './types'
import { harmonicCentroid, harmonicMedian, voiceSpread } from './voices'

export { WRONG_NOTE_CENTS }
import type { ExpectedHold, HoldReasonCode, MeasuredHold, Measurement, MeasurementWarning } from './types'

export interface MeasureOptions {
  /** Called with 0…1 as the work proceeds. */
  onProgress?: (fraction: number) => void
  /** Include a decimated f0 trace per hold (default true). */
  trace?: boolean
}

const SILENT_PEAK = 1e-4 // −80 dBFS
const CLIPPED_ERROR_SHARE = 0.05
const CLIPPED_WARN_SHARE = 0.001
const MIN_STEADY_S = 0.15
const BIN_S = 0.005
/** Spread between voices (cents, RMS about the moving centre) above which a hold is taken for several voices. */
const SEVERAL_VOICES_CENTS = 8
/** …and slow wander of the phase track (its spread, vibrato removed) of at least this much: voices
 *  beating hand the track from one to another, one voice does not wander so (calibrated on the
 *  sampled corpus: one voice or instrument at most 2.4 ¢ where the spread between voices passes
 *  8 ¢, a section at least 2.8 ¢). */
const SEVERAL_VOICES_WANDER_CENTS = 2.6
/** Highest confidence of a hold picked out of a sounding chord (below the 0.8 of a sure hold). */
const CHORD_CONFIDENCE_MAX = 0.6
/** Chord holds found but left unmeasured because another part doubles them an octave below (the
 *  note's series was heard: the chord pass counts them when it is weighed against the free one). */
const doubledBelow = new WeakSet<MeasuredHold>()
/** A chord hold is taken as doubled an octave below when the power at half its frequency stands this far
 *  above the quarter points… (on the quartet corpus: doubled holds 1,300–180,000, the others below 10) */
const DOUBLED_SUB_NOISE = 100
/** …and holds at least this share of the note's own fundamental (doubled 0.13–0.62, others below 0.01). */
const DOUBLED_SUB_FUNDAMENTAL = 0.05
/** Under a map from the whole chord's onsets a hold stays on its own chord, give or take this
 *  much (the onsets found lie up to a few frames from the chord starts). */
const CHORD_MAP_TOLERANCE_S = 0.15
/** …and a frame where its series does not stand out of the chord weighs little against it
 *  (alone, a frame with no pitch inside a hold costs 0.8 of a matching frame's gain: align.ts). */
const CHORD_UNVOICED_COST = 0.2
/** Share of the holds below which the free pitch search is taken to follow another part of a sounding chord. */
const CHORD_TRY_SHARE = 0.6

const log2c = (x: number) => 1200 * Math.log2(x)

/** Measures every expected hold of a part in a decoded take. */
export function measureTake (audio: DecodedAudio, expected: ExpectedHold[], opts: MeasureOptions = {}): Measurement {
  const progress = opts.onProgress ?? (() => {})
  const sr = audio.sampleRate
  let x = audio.samples
  if (!x || x.length === 0) throw new AnalysisError('empty')
  if (!(sr >= 1000) || !Number.isFinite(sr)) throw new AnalysisError('corrupt', { sampleRate: sr })
  const notes = expected.filter(h => h.midi !== null && h.expectedHz > 0 && Number.isFinite(h.expectedHz))
    .sort((a, b) => a.startS - b.startS)
  if (notes.length === 0) {
    throw new AnalysisError('no_holds', { reason: 'part_rests' }, 'This part rests throughout the drill: there is nothing to measure')
  }
  const durationS = x.length / sr
  const { peak, clipped, dc } = scan(x)
  // A constant offset (some interfaces record one) would only raise the energy floor: remove it.
  if (Math.abs(dc) > 1e-4) x = subtract(x, dc)
  if (!(peak > SILENT_PEAK)) throw new AnalysisError('silent', { peakDbfs: peak > 0 ? +(20 * Math.log10(peak)).toFixed(1) : null })
  progress(0.02)

  const pyr = new Pyramid(x, sr)
  // One coarse track per band of expected notes (a part spanning two octaves gets two).
  const bands = noteBands(notes.map(h => h.expectedHz))
  const bandTracks = bands.map(b => coarseTrack(pyr, b))
  const bandOf = notes.map(h => bands.findIndex(b => h.expectedHz >= b.minHz && h.expectedHz <= b.maxHz))
  progress(0.3)
  let voicedFrames = 0
  {
    const F = Math.min(...bandTracks.map(t => t.voiced.length))
    for (let j = 0; j < F; j++) if (bandTracks.some(t => t.voiced[j])) voicedFrames++
  }
  const track = bandTracks[0]!
  if (voicedFrames === 0) throw new AnalysisError('silent', { peakDbfs: +(20 * Math.log10(peak)).toFixed(1), pitchedFrames: 0 })

  const warnings: MeasurementWarning[] = []
  const clippedShareOverall = audio.clippedShare ?? clipped / x.length
  const soundingSamples = Math.max(1, voicedFrames * track.hopS * sr)
  const clippedShare = Math.min(1, (clippedShareOverall * x.length) / soundingSamples)
  if (clippedShare > CLIPPED_ERROR_SHARE) {
    throw new AnalysisError('clipped', { clippedShare: +clippedShare.toFixed(4) })
  }
  const clipWarn = clippedShare > CLIPPED_WARN_SHARE
  if (clipWarn) warnings.push({ code: 'clipping', message: `${(100 * clippedShare).toFixed(1)} % of the sounding samples are clipped; record a little quieter next time` })
  if (peak < 0.01) warnings.push({ code: 'low_level', message: 'The recording is very quiet (peak below −40 dBFS); measurements may be less certain' })

  // One pass: placement, time map and measurement of every hold over the given coarse tracks.
  const pass = (trackOf: CoarseTrack[], inChord: boolean, report: (f: number) => void, known: TimeMap | null = null): { holds: MeasuredHold[], map: TimeMap } => {
    // Time map: a first alignment from the pitch track alone, then the map refitted to the onsets
    // it found (robust to missing and extra chords) and the holds placed again under that map.
    const boundCache = new Map<CoarseTrack, Uint8Array>()
    const bounds = trackOf.map((t) => {
      if (!boundCache.has(t)) boundCache.set(t, boundaryFrames(t))
      return boundCache.get(t)!
    })
    // The map is fitted to the onsets where the note changes (or after a rest) when there are
    // enough of them: a repeated note's re-attack is hard to tell from the dips of several voices
    // beating, and two such onsets a chord off tip a short take's map by several per cent.
    const changes = notes.map((h, i) => i === 0 || notes[i - 1]!.midi !== h.midi || notes[i - 1]!.endS < h.startS)
    const onsetPairs = (f: ReturnType<typeof findOnsets>) => {
      const all = f.flatMap((o, i) => (o.onsetS === null ? [] : [{ drillS: notes[i]!.startS, takeS: o.onsetS, change: changes[i]! }]))
      const sure = all.filter(p => p.change)
      return sure.length >= Math.max(3, 0.5 * all.length) ? sure : all
    }
    let alignment = alignHolds(trackOf, notes, known ? { map: known, withinChordS: CHORD_MAP_TOLERANCE_S, unvoicedCost: CHORD_UNVOICED_COST } : {})
    // Under a chord map the placed start is already within its chord: before it, the part's
    // series may be another part's same note in the chord before (the tuba's G2 before the
    // trombone's), not its onset.
    const lookBack = known ? 0 : 0.15
    let found = findOnsets(trackOf, alignment.placements, notes, bounds, lookBack)
    let map: TimeMap = { offsetS: alignment.offsetS, timeScale: alignment.timeScale }
    // A map known from the whole chord's onsets is kept: the part's own onsets are fewer.
    const refit = known ? null : fitTimeMap(onsetPairs(found))
    if (refit) {
      alignment = alignHolds(trackOf, notes, { map: refit })
      found = findOnsets(trackOf, alignment.placements, notes, bounds, lookBack)
      map = fitTimeMap(onsetPairs(found)) ?? refit
    }
    // A repeated note with no re-articulation (a tie, legato singing): split at the drill's chord
    // boundary under the map, and the hold says so (timing.start = 'chord_boundary').
    for (let i = 1; i < notes.length; i++) {
      const p = alignment.placements[i]!
      const q = alignment.placements[i - 1]!
      if (!p.found || !q.found || found[i]!.articulated) continue
      const cut = map.offsetS + map.timeScale * notes[i]!.startS
      if (cut > q.startS + 0.2 && cut < p.endS - 0.2) { q.endS = cut; p.startS = cut }
    }
    report(0)
    const holds: MeasuredHold[] = []
    // Frames the alignment gave to a hold: a missing hold never takes another hold's sound.
    const used = new Uint8Array(track.times.length)
    for (const p of alignment.placements) if (p.found) used.fill(1, Math.max(0, p.frameStart), Math.min(used.length, p.frameEnd))
    for (let i = 0; i < notes.length; i++) {
      const h = notes[i]!
      const p = alignment.placements[i]!
      const expectedDur = map.timeScale * (h.endS - h.startS)
      let m: MeasuredHold
      if (!p.found) {
        m = missing(pyr, h, p.startS, p.endS, trackOf[i]!, used, durationS, expectedDur, clipWarn, opts.trace !== false)
      } else {
        // In a chord the frames before the note's own onset are the end of the chord before
        // (a repeated note's tail, other parts' releases): the hold is measured from its onset.
        const from = inChord && found[i]!.onsetS !== null ? Math.max(p.startS, Math.min(found[i]!.onsetS!, p.endS - 0.3)) : p.startS
        m = measureHold(pyr, trackOf[i]!, h, from, p.endS, expectedDur, clipWarn, opts.trace !== false, inChord)
        m.timing = holdTiming(found[i]!, h, map)
      }
      holds.push(m)
      report((i + 1) / notes.length)
    }
    return { holds, map }
  }
  const measured = (hs: MeasuredHold[]) => hs.filter(hh => hh.detectedHz !== null && hh.reasonCode === null).length
  // Wrong notes heard at one and the same distance from the expected ones (to the semitone): the
  // part played in another key or octave. In a chord the free search hears other parts' notes
  // instead, at distances that change from chord to chord.
  const consistentWrong = (hs: MeasuredHold[]) => {
    const by = new Map<number, number>()
    for (const hh of hs) {
      if (hh.reasonCode !== 'wrong_note' || hh.detectedHz === null) continue
      const k = Math.round(12 * Math.log2(hh.detectedHz / hh.expectedHz))
      by.set(k, (by.get(k) ?? 0) + 1)
    }
    return Math.max(0, ...by.values())
  }
  const plainTracks = bandOf.map(k => bandTracks[k]!)
  let { holds, map } = pass(plainTracks, false, f => progress(0.4 + 0.5 * f))
  // A part inside a sounding chord (the take holds the whole chord): the free pitch search follows
  // another part (usually the bass) and measures few holds. When fewer than CHORD_TRY_SHARE of
  // them are measured, the part's own harmonic series is searched for instead (pitch.ts
  // chordTracks), and that pass is kept only when it measures clearly more holds than the free
  // pass measured, and more than it measured plus the wrong notes it heard at one distance (a take
  // in a wrong key or octave stays a take of wrong notes).
  let inChord = false
  if (measured(holds) < CHORD_TRY_SHARE * notes.length) {
    const perBand = bands.map(b => chordTracks(pyr, b, notes.map(h => h.expectedHz)))
    const chordOf = notes.map((h, i) => perBand[bandOf[i]!]!.get(h.expectedHz)!)
    // The whole chord's onsets (every part moves at a chord change) give the map; the part's own
    // series, shared at times with another part's note, would give a poor one.
    const onsets: number[] = []
    for (const t of bandTracks) {
      const bf = boundaryFrames(t)
      for (let j = 0; j < bf.length; j++) if (bf[j]) onsets.push(t.times[j]! - t.hopS / 2)
    }
    // Chord starts include those where this part rests (the other parts still move there).
    const chords = expected.filter(h => Number.isFinite(h.startS) && Number.isFinite(h.endS))
    const known = mapFromOnsets(onsets, chords.map(h => h.startS), { sound: soundExtent(bandTracks), drillEndS: Math.max(...chords.map(h => h.endS)) })
    const chord = pass(chordOf, true, f => progress(0.9 + 0.1 * f), known)
    const n = measured(chord.holds) + chord.holds.filter(hh => doubledBelow.has(hh)).length
    if (n >= Math.max(measured(holds) + 2, 1.5 * measured(holds)) && n > measured(holds) + consistentWrong(holds)) {
      inChord = true
      holds = chord.holds
      map = chord.map
    }
  }
  progress(1)
  const scale = map.timeScale
  // Nothing found and nothing that even resembles a note (no octave or wrong-note findings):
  // the recording holds no measurable notes at all (noise, speech, another piece).
  if (holds.every(hh => hh.detectedHz === null && (hh.reasonCode === 'no_pitch' || hh.reasonCode === 'beyond_take' || hh.reasonCode === 'too_short'))) {
    throw new AnalysisError('no_holds', { reasons: holds.map(hh => hh.reasonCode) })
  }
  if (inChord) warnings.push({ code: 'whole_chord', message: 'The take holds the whole chord: this part was picked out by its own harmonics, so its holds are less certain than a take of the part alone' })
  const notFound = holds.filter(hh => hh.detectedHz === null).length
  if (notFound > 0) warnings.push({ code: 'holds_missing', message: `${notFound} of ${holds.length} holds could not be measured` })
  return {
    take: { durationS, sampleRate: sr, channels: audio.channels },
    holds,
    timeScale: round(scale, 5),
    offsetS: round(map.offsetS, 3),
    warnings,
    engine: ENGINE_VERSION,
  }
}

// First and last voiced frame of any band (the tracks share their frame times).
function soundExtent (tracks: CoarseTrack[]): { startS: number, endS: number } | undefined {
  const t = tracks[0]!
  const F = Math.min(...tracks.map(tr => tr.voiced.length))
  const voiced = (j: number) => tracks.some(tr => tr.voiced[j] === 1)
  let a = 0
  while (a < F && !voiced(a)) a++
  let z = F - 1
  while (z > a && !voiced(z)) z--
  return a < F ? { startS: t.times[a]! - t.hopS / 2, endS: t.times[z]! + t.hopS / 2 } : undefined
}

// Peak, samples at full scale and mean of a signal, in one pass.
function scan (x: Float32Array): { peak: number, clipped: number, dc: number } {
  let peak = 0
  let clipped = 0
  let sum = 0
  const n = x.length
  for (let i = 0; i < n; i++) {
    const v = x[i]!
    const a = v < 0 ? -v : v
    if (a > peak) peak = a
    if (a >= 0.999) clipped++
    sum += v
  }
  return { peak, clipped, dc: n > 0 ? sum / n : 0 }
}

function subtract (x: Float32Array, c: number): Float32Array {
  const y = new Float32Array(x.length)
  for (let i = 0; i < x.length; i++) y[i] = x[i]! - c
  return y
}

function round (v: number, d: number): number {
  const f = Math.pow(10, d)
  return Math.round(v * f) / f
}

function noteWord (h: ExpectedHold): string {
  return `the expected note (${h.expectedHz.toFixed(2)} Hz)`
}

function notFound (h: ExpectedHold, startS: number, endS: number, code: HoldReasonCode, reason: string): MeasuredHold {
  return {
    index: h.index,
    startS: round(Math.max(0, startS), 3),
    endS: round(Math.max(0, endS), 3),
    detectedHz: null,
    spreadCents: null,
    slopeCentsPerS: null,
    confidence: 0,
    vibrato: null,
    reason,
    reasonCode: code,
    expectedHz: h.expectedHz,
    steadyStartS: null,
    steadyEndS: null,
    centreErrorCents: null,
  }
}

// A hold the alignment left empty: say what was there instead. A clearly different steady
// note is measured at the pitch heard and reported as a wrong note; nothing else is guessed.
function missing (pyr: Pyramid, h: ExpectedHold, startS: number, endS: number, track: CoarseTrack, used: Uint8Array,
  durationS: number, expectedDur: number, clipWarn: boolean, withTrace: boolean): MeasuredHold {
  if (startS >= durationS - 0.1) return notFound(h, startS, endS, 'beyond_take', 'The take ends before this chord')
  const beyond = endS > durationS + 0.05
  const a = Math.max(0, Math.floor(startS / track.hopS))
  const b = Math.min(track.times.length, Math.ceil(endS / track.hopS))
  // The longest stretch of frames no other hold was placed on.
  let runA = a
  let runB = a
  for (let j = a, cur = a; j <= b; j++) {
    if (j === b || used[j]) {
      if (j - cur > runB - runA) { runA = cur; runB = j }
      cur = j + 1
    }
  }
  const cents: number[] = []
  for (let j = runA; j < runB; j++) if (track.voiced[j]) cents.push(log2c(track.hz[j]! / h.expectedHz))
  if (cents.length >= Math.max(5, 0.3 * (b - a))) {
    const c = median(cents)
    if (Math.abs(c) > WRONG_NOTE_CENTS) {
      // Only the frames near the median note: a neighbouring chord inside the window is not it.
      const near = cents.filter(v => Math.abs(v - c) <= 60)
      if (near.length >= Math.max(5, 0.25 * (b - a))) {
        const heardHz = h.expectedHz * Math.pow(2, median(near) / 1200)
        const s0 = runA * track.hopS
        const s1 = Math.min(runB * track.hopS, durationS)
        const tr = refinePitch(pyr, s0, s1, heardHz)
        const m = measureSteady(tr, h, s0, s1, expectedDur, clipWarn, withTrace)
        if (m.detectedHz !== null) return asWrongNote(m, h)
      }
    }
  }
  if (beyond) return notFound(h, startS, endS, 'beyond_take', 'The take ends during this chord')
  return notFound(h, startS, endS, 'no_pitch', `No steady pitch near ${noteWord(h)} where this chord should be`)
}

/** Cents of a measured hold from the expected note's equal-tempered pitch (null when none). */
function centsFromExpected (m: MeasuredHold): number | null {
  return m.detectedHz === null ? null : log2c(m.detectedHz / m.expectedHz)
}

// A measured hold whose pitch is a different note: the pitch is kept, the code says wrong_note.
function asWrongNote (m: MeasuredHold, h: ExpectedHold): MeasuredHold {
  const c = centsFromExpected(m)!
  const semis = Math.round(c / 100)
  const dir = c > 0 ? 'above' : 'below'
  const what = Math.abs(semis) === 12
    ? `an octave ${dir}`
    : `about ${Math.abs(semis)} semitone${Math.abs(semis) === 1 ? '' : 's'} ${dir}`
  return { ...m, reasonCode: 'wrong_note', reason: `Heard a different note: ${what} ${noteWord(h)}` }
}

interface Binned {
  t: Float64Array
  c: Float64Array // cents from expected (NaN = no data)
  h: Float64Array // harmonicity
}

// Averages the fine track into 5-ms bins (means of cents keep the telescoping property).
function binTrack (tr: RefinedTrack, expectedHz: number, startS: number, endS: number): Binned {
  const n = Math.max(0, Math.ceil((endS - startS) / BIN_S))
  const sum = new Float64Array(n)
  const cnt = new Float64Array(n)
  const hs = new Float64Array(n)
  const ok = (m: number) => Number.isFinite(tr.hz[m]!) && tr.harmonicity[m]! >= 0.5
  let levelRef = 0
  {
    const lv: number[] = []
    for (let m = 0; m < tr.hz.length; m++) if (ok(m)) lv.push(tr.level[m]!)
    levelRef = quantile(lv, 0.75)
  }
  for (let m = 0; m < tr.hz.length; m++) {
    if (!ok(m) || !(tr.level[m]! >= 0.05 * levelRef)) continue
    const k = Math.floor((tr.times[m]! - startS) / BIN_S)
    if (k < 0 || k >= n) continue
    sum[k]! += log2c(tr.hz[m]! / expectedHz)
    hs[k]! += tr.harmonicity[m]!
    cnt[k]!++
  }
  const t = new Float64Array(n)
  const c = new Float64Array(n)
  const h = new Float64Array(n)
  for (let k = 0; k < n; k++) {
    t[k] = startS + (k + 0.5) * BIN_S
    c[k] = cnt[k]! > 0 ? sum[k]! / cnt[k]! : NaN
    h[k] = cnt[k]! > 0 ? hs[k]! / cnt[k]! : 0
  }
  return { t, c, h }
}

// Running mean over `w` bins ignoring NaN.
function smooth (c: Float64Array, w: number): Float64Array {
  const n = c.length
  const out = new Float64Array(n)
  const h = w >> 1
  for (let i = 0; i < n; i++) {
    let s = 0
    let k = 0
    for (let j = Math.max(0, i - h); j <= Math.min(n - 1, i + h); j++) if (Number.isFinite(c[j]!)) { s += c[j]!; k++ }
    out[i] = k > 0 ? s / k : NaN
  }
  return out
}

interface Fit {
  centre: number
  slope: number
  vib: { a: number, b: number, omega: number } | null
  resid: Float64Array
  tMid: number
}

// Solves a small symmetric system (Gaussian elimination with partial pivoting).
function solve (A: number[][], y: number[]): number[] | null {
  const n = y.length
  const M = A.map((row, i) => [...row, y[i]!])
  for (let c = 0; c < n; c++) {
    let p = c
    for (let r = c + 1; r < n; r++) if (Math.abs(M[r]![c]!) > Math.abs(M[p]![c]!)) p = r
    if (Math.abs(M[p]![c]!) < 1e-12) return null
    ;[M[c], M[p]] = [M[p]!, M[c]!]
    for (let r = c + 1; r < n; r++) {
      const f = M[r]![c]! / M[c]![c]!
      for (let k = c; k <= n; k++) M[r]![k]! -= f * M[c]![k]!
    }
  }
  const out = new Array<number>(n).fill(0)
  for (let r = n - 1; r >= 0; r--) {
    let s = M[r]![n]!
    for (let k = r + 1; k < n; k++) s -= M[r]![k]! * out[k]!
    out[r] = s / M[r]![r]!
  }
  return out
}

// Huber IRLS of c(t) on [1, t−tMid, cos ω(t−tMid), sin ω(t−tMid)] over bins lo..hi.
function robustFit (b: Binned, lo: number, hi: number, omega: number | null): Fit | null {
  let n = 0
  for (let k = lo; k <= hi; k++) if (Number.isFinite(b.c[k]!)) n++
  if (n < 8) return null
  const tMid = (b.t[lo]! + b.t[hi]!) / 2
  const p = omega ? 4 : 2
  // Basis columns and data, packed once.
  const X = new Float64Array(n * p)
  const y = new Float64Array(n)
  const kIdx = new Int32Array(n)
  {
    let q = 0
    for (let k = lo; k <= hi; k++) {
      if (!Number.isFinite(b.c[k]!)) continue
      const d = b.t[k]! - tMid
      X[q * p] = 1
      X[q * p + 1] = d
      if (omega) { X[q * p + 2] = Math.cos(omega * d); X[q * p + 3] = Math.sin(omega * d) }
      y[q] = b.c[k]!
      kIdx[q] = k
      q++
    }
  }
  const w = new Float64Array(n).fill(1)
  const res = new Float64Array(n)
  const absRes = new Float64Array(n)
  let coef: number[] | null = null
  let kH = Infinity
  for (let iter = 0; iter < 6; iter++) {
    const A = Array.from({ length: p }, () => new Array<number>(p).fill(0))
    const rhs = new Array<number>(p).fill(0)
    for (let q = 0; q < n; q++) {
      const wq = w[q]!
      const o = q * p
      for (let i = 0; i < p; i++) {
        const wi = wq * X[o + i]!
        rhs[i]! += wi * y[q]!
        for (let j = i; j < p; j++) A[i]![j]! += wi * X[o + j]!
      }
    }
    for (let i = 0; i < p; i++) for (let j = 0; j < i; j++) A[i]![j] = A[j]![i]!
    const sol = solve(A, rhs)
    if (!sol) break
    coef = sol
    for (let q = 0; q < n; q++) {
      let v = 0
      for (let i = 0; i < p; i++) v += coef[i]! * X[q * p + i]!
      res[q] = y[q]! - v
      absRes[q] = Math.abs(res[q]!)
    }
    // Huber scale from the MAD of the first fits, then held (saves sorting every pass).
    if (iter < 2) kH = 2 * Math.max(1.4826 * median(absRes), 0.05)
    for (let q = 0; q < n; q++) w[q] = absRes[q]! <= kH ? 1 : kH / absRes[q]!
  }
  if (!coef) return null
  const resid = new Float64Array(b.c.length).fill(NaN)
  for (let q = 0; q < n; q++) resid[kIdx[q]!] = res[q]!
  return { centre: coef[0]!, slope: coef[1]!, vib: omega ? { a: coef[2]!, b: coef[3]!, omega } : null, resid, tMid }
}

// Least-squares sinusoid amplitude of the residual at rates 3.5–9 Hz; the peak when it stands out.
function findVibrato (b: Binned, fit: Fit, lo: number, hi: number): { rateHz: number, amp: number } | null {
  let count = 0
  for (let k = lo; k <= hi; k++) if (Number.isFinite(fit.resid[k]!)) count++
  const T = b.t[hi]! - b.t[lo]!
  if (count < 20 || T < 0.3) return null
  // Bins are uniform: cos/sin by rotation, no trig per bin.
  const ampAt = (nu: number): number => {
    const om = 2 * Math.PI * nu
    const dr = Math.cos(om * BIN_S)
    const di = Math.sin(om * BIN_S)
    let cr = Math.cos(om * (b.t[lo]! - fit.tMid))
    let ci = Math.sin(om * (b.t[lo]! - fit.tMid))
    let cc = 0; let ss = 0; let cs = 0; let yc = 0; let ys = 0
    for (let k = lo; k <= hi; k++) {
      const y = fit.resid[k]!
      if (y === y) {
        cc += cr * cr; ss += ci * ci; cs += cr * ci; yc += y * cr; ys += y * ci
      }
      const t = cr * dr - ci * di
      ci = cr * di + ci * dr
      cr = t
    }
    const det = cc * ss - cs * cs
    if (!(det > 1e-9)) return 0
    return Math.hypot((yc * ss - ys * cs) / det, (ys * cc - yc * cs) / det)
  }
  const rates: number[] = []
  const amps: number[] = []
  for (let nu = 3.5; nu <= 9.0001; nu += 0.1) { rates.push(nu); amps.push(ampAt(nu)) }
  let best = 0
  for (let i = 1; i < amps.length; i++) if (amps[i]! > amps[best]!) best = i
  if (best === 0 || best === amps.length - 1) return null
  const floor = median(amps)
  // A clear peak, or on short windows (few cycles, so a broad peak) a large one.
  const clear = amps[best]! >= 1.5 && amps[best]! > 3 * floor
  const large = amps[best]! >= 5 && amps[best]! > 1.5 * floor
  if (!clear && !large) return null
  // Finer look around the peak, then a parabola through the best three.
  let rate = rates[best]!
  let amp = amps[best]!
  for (let nu = rates[best - 1]!; nu <= rates[best + 1]! + 1e-9; nu += 0.02) {
    const a = ampAt(nu)
    if (a > amp) { amp = a; rate = nu }
  }
  if (T * rate < 1) return null
  const y0 = ampAt(rate - 0.02) ** 2
  const y1 = amp ** 2
  const y2 = ampAt(rate + 0.02) ** 2
  const den = y0 - 2 * y1 + y2
  const shift = den < 0 ? 0.5 * (y0 - y2) / den : 0
  return { rateHz: rate + Math.max(-0.5, Math.min(0.5, shift)) * 0.02, amp }
}

// How much the analysis (Hann frame, span between compared frames, 5-ms bins) shrinks a
// sinusoidal pitch modulation at rate ν; the extent is divided by it.
function vibratoGain (nu: number, tr: RefinedTrack): number {
  const sinc = (x: number) => (Math.abs(x) < 1e-9 ? 1 : Math.sin(Math.PI * x) / (Math.PI * x))
  // Hann window of length T: transform ∝ sinc(νT)/(1 − (νT)²), normalised at 0.
  const hannT = tr.frameS
  const u = nu * hannT
  const hann = Math.abs(1 - u * u) < 1e-6 ? 0.5 : sinc(u) / (1 - u * u)
  return Math.abs(hann * sinc(nu * tr.spanS) * sinc(nu * BIN_S))
}

function measureHold (pyr: Pyramid, track: CoarseTrack, h: ExpectedHold, startS: number, endS: number,
  expectedDur: number, clipWarn: boolean, withTrace: boolean, inChord = false): MeasuredHold {
  // Octave the detector heard: majority over the run's voiced frames.
  const a = Math.max(0, Math.floor(startS / track.hopS))
  const b = Math.min(track.times.length, Math.ceil(endS / track.hopS))
  const byOct = new Map<number, number[]>()
  for (let j = a; j < b; j++) {
    if (!track.voiced[j]) continue
    const c = log2c(track.hz[j]! / h.expectedHz)
    const oct = Math.max(-1, Math.min(1, Math.round(c / 1200)))
    const rest = c - 1200 * oct
    if (Math.abs(rest) > 600) continue
    if (!byOct.has(oct)) byOct.set(oct, [])
    byOct.get(oct)!.push(rest)
  }
  let oct = 0
  let best = -1
  for (const [o, list] of byOct) if (list.length > best) { best = list.length; oct = o }
  const rests = byOct.get(oct) ?? []
  if (rests.length < 3) return notFound(h, startS, endS, 'no_pitch', `No steady pitch near ${noteWord(h)} where this chord should be`)
  const guessCents = median(rests)
  const guessHz = h.expectedHz * Math.pow(2, guessCents / 1200)

  const tr = refinePitch(pyr, startS, endS, guessHz, { chord: inChord })
  // Octave guard, on the refined pitch (the coarse one can be tens of cents off when the
  // detector heard another octave): when the detector heard another octave, could not reach the
  // one below, or the odd harmonics are missing, long-window harmonic evidence decides. Not in a
  // chord: the other parts sound at the octaves and half-way points it probes.
  if (!inChord) {
    let odd = 0
    let even = 0
    for (let k = 0; k < tr.harmonics; k++) { if (k % 2 === 0) odd += tr.harmonicPower[k]!; else even += tr.harmonicPower[k]! }
    const fRef = median(tr.hz)
    const oddMissing = tr.harmonics >= 4 && odd < 0.01 * even
    if (Number.isFinite(fRef) && (oct !== 0 || oddMissing || track.reachHz > fRef / 2 / 1.02)) {
      const ev = octaveEvidence(pyr, startS, endS, fRef)
      const harm = Math.max(ev.odd, ev.even)
      const octave = ev.even > 30 * ev.noise && ev.odd < 4 * ev.noise
        ? 2
        : ev.half > 6 * ev.noise && ev.half > 0.03 * harm ? 0.5 : 0
      if (octave) {
        // Measured at the octave heard and reported as a wrong note (never a 1200 ¢ deviation).
        const tr2 = refinePitch(pyr, startS, endS, octave * fRef)
        const m = measureSteady(tr2, h, startS, endS, expectedDur, clipWarn, withTrace)
        if (m.detectedHz !== null && Math.abs(centsFromExpected(m)!) > WRONG_NOTE_CENTS) return asWrongNote(m, h)
        return notFound(h, startS, endS, 'wrong_note', `Heard a different note: an octave ${octave > 1 ? 'above' : 'below'} ${noteWord(h)}`)
      }
    }
  }
  const m = measureSteady(tr, h, startS, endS, expectedDur, clipWarn, withTrace, inChord)
  if (m.detectedHz !== null && Math.abs(centsFromExpected(m)!) > WRONG_NOTE_CENTS) return asWrongNote(m, h)
  // In a chord, another part an octave (or two) below sounds on every harmonic of the note and its
  // fundamental (or 2nd harmonic) stands at half the note's frequency: the two cannot be told apart.
  if (inChord && m.detectedHz !== null) {
    const ev = subOctaveEvidence(pyr, m.steadyStartS!, m.steadyEndS!, m.detectedHz)
    if (ev.sub > 0 && ev.sub >= DOUBLED_SUB_NOISE * ev.noise && ev.sub >= DOUBLED_SUB_FUNDAMENTAL * ev.fundamental) {
      const d = notFound(h, startS, endS, 'no_pitch', `Another part sounds ${noteWord(h)} an octave below here: the two cannot be told apart`)
      doubledBelow.add(d)
      return d
    }
  }
  return m
}

// The steady part of a refined track: plateau, trims, robust centre, spread, vibrato, confidence.
function measureSteady (tr: RefinedTrack, h: ExpectedHold, startS: number, endS: number,
  expectedDur: number, clipWarn: boolean, withTrace: boolean, inChord = false): MeasuredHold {
  const bins = binTrack(tr, h.expectedHz, startS, endS)
  const n = bins.c.length
  // Main plateau: the longest run (gaps ≤ 60 ms) within 100 ¢ of the run's median.
  const sm = smooth(bins.c, 11)
  const ref = median(sm)
  if (!Number.isFinite(ref)) return notFound(h, startS, endS, 'no_pitch', `No steady pitch near ${noteWord(h)} where this chord should be`)
  let runLo = -1
  let runHi = -1
  {
    let curLo = -1
    let lastOk = -1
    const maxGap = Math.round(0.06 / BIN_S)
    for (let k = 0; k < n; k++) {
      const ok = Number.isFinite(sm[k]!) && Number.isFinite(bins.c[k]!) && Math.abs(sm[k]! - ref) <= 100
      if (!ok) continue
      if (curLo < 0 || k - lastOk > maxGap) curLo = k
      lastOk = k
      if (runLo < 0 || lastOk - curLo > runHi - runLo) { runLo = curLo; runHi = lastOk }
    }
  }
  if (runLo < 0) return notFound(h, startS, endS, 'no_pitch', `No steady pitch near ${noteWord(h)} where this chord should be`)
  const plateauS = (runHi - runLo + 1) * BIN_S
  // The settling transient of a real attack lasts 0.1–0.2 s: start the steady part ≥ 0.18 s
  // after the plateau begins (which is itself a few tens of ms after the onset).
  let trimA = Math.min(0.3, Math.max(0.18, 0.12 * plateauS))
  let trimR = Math.min(0.2, Math.max(0.08, 0.06 * plateauS))
  // Short holds: shrink both trims (to no less than 50 and 40 ms) so that MIN_STEADY_S remains.
  if (plateauS - trimA - trimR < MIN_STEADY_S) {
    const room = Math.max(0, plateauS - MIN_STEADY_S)
    const f = room / (trimA + trimR)
    trimA = Math.max(0.05, trimA * f)
    trimR = Math.max(0.04, trimR * f)
  }
  let lo = runLo + Math.round(trimA / BIN_S)
  let hi = runHi - Math.round(trimR / BIN_S)
  const minBins = Math.round(MIN_STEADY_S / BIN_S)
  if (hi - lo + 1 < minBins) {
    return notFound(h, startS, endS, 'too_short', `Too little steady sound to measure (${plateauS.toFixed(2)} s)`)
  }

  // First fit, vibrato search, then trim any settling transient still visible at either end.
  let fit = robustFit(bins, lo, hi, null)
  if (!fit) return notFound(h, startS, endS, 'too_short', 'Too little steady sound to measure')
  let vib = findVibrato(bins, fit, lo, hi)
  if (vib) fit = robustFit(bins, lo, hi, 2 * Math.PI * vib.rateHz) ?? fit
  {
    const rs = smooth(fit.resid, 13)
    const vals: number[] = []
    for (let k = lo; k <= hi; k++) if (Number.isFinite(rs[k]!)) vals.push(rs[k]!)
    const sd = Math.sqrt(vals.reduce((s, v) => s + v * v, 0) / Math.max(1, vals.length))
    const thr = Math.max(4, 3 * sd)
    const maxExtra = Math.round(0.4 / BIN_S)
    let newLo = lo
    while (newLo < lo + maxExtra && newLo < hi - minBins && !(Math.abs(rs[newLo]!) <= thr)) newLo++
    let newHi = hi
    while (newHi > hi - maxExtra && newHi > newLo + minBins && !(Math.abs(rs[newHi]!) <= thr)) newHi--
    if (newLo !== lo || newHi !== hi) {
      lo = newLo
      hi = newHi
      const f2 = robustFit(bins, lo, hi, null)
      if (f2) {
        fit = f2
        vib = findVibrato(bins, fit, lo, hi)
        if (vib) fit = robustFit(bins, lo, hi, 2 * Math.PI * vib.rateHz) ?? fit
      }
    }
  }
  // Over a whole number of vibrato cycles, centred in the window.
  if (vib) {
    const T = (hi - lo + 1) * BIN_S
    const cycles = Math.floor(T * vib.rateHz)
    if (cycles >= 1) {
      const keep = Math.round(cycles / vib.rateHz / BIN_S)
      const cut = (hi - lo + 1) - keep
      lo += cut >> 1
      hi = lo + keep - 1
      fit = robustFit(bins, lo, hi, 2 * Math.PI * vib.rateHz) ?? fit
    }
  }

  const centre = fit.centre
  const steadyS = (hi - lo + 1) * BIN_S

  // The steady residual e = c − centre − trend (gaps interpolated), split by a moving average
  // over one vibrato period (or 0.2 s without vibrato): its nulls fall on the vibrato rate and
  // harmonics, so the average keeps the slow wander and drops the vibrato even when its rate
  // and depth wander; e minus the average is the vibrato (plus a little noise). Only the
  // stretch where the whole average fits is used.
  const m0 = hi - lo + 1
  const e = new Float64Array(m0)
  {
    for (let k = lo; k <= hi; k++) {
      const v = bins.c[k]!
      e[k - lo] = Number.isFinite(v) ? v - centre - fit.slope * (bins.t[k]! - fit.tMid) : NaN
    }
    let prevIdx = -1
    for (let q = 0; q < m0; q++) {
      if (!Number.isFinite(e[q]!)) continue
      if (prevIdx < 0) for (let z = 0; z < q; z++) e[z] = e[q]!
      else for (let z = prevIdx + 1; z < q; z++) e[z] = e[prevIdx]! + (e[q]! - e[prevIdx]!) * (z - prevIdx) / (q - prevIdx)
      prevIdx = q
    }
    for (let z = prevIdx + 1; z < m0; z++) e[z] = prevIdx >= 0 ? e[prevIdx]! : 0
  }
  const period = fit.vib ? Math.max(3, Math.round(2 * Math.PI / fit.vib.omega / BIN_S)) : Math.round(0.2 / BIN_S)
  const halfP = period >> 1
  const vLo = halfP
  const vHi = m0 - 1 - halfP
  const slow = new Float64Array(m0).fill(NaN)
  let spread = 0
  let vibRms = NaN
  if (vHi >= vLo) {
    const cum = new Float64Array(m0 + 1)
    for (let q = 0; q < m0; q++) cum[q + 1] = cum[q]! + e[q]!
    let s2 = 0
    let v2 = 0
    for (let q = vLo; q <= vHi; q++) {
      slow[q] = (cum[q + halfP + 1]! - cum[q - halfP]!) / (2 * halfP + 1)
      const w = slow[q]! + fit.slope * (bins.t[lo + q]! - fit.tMid)
      s2 += w * w
      const v = e[q]! - slow[q]!
      v2 += v * v
    }
    spread = Math.sqrt(s2 / (vHi - vLo + 1))
    vibRms = Math.sqrt(v2 / (vHi - vLo + 1))
  } else {
    // Shorter than one period: the fitted sinusoid stands in for the vibrato.
    let s2 = 0
    for (let q = 0; q < m0; q++) {
      let v = e[q]! + fit.slope * (bins.t[lo + q]! - fit.tMid)
      if (fit.vib) { const d = bins.t[lo + q]! - fit.tMid; v -= fit.vib.a * Math.cos(fit.vib.omega * d) + fit.vib.b * Math.sin(fit.vib.omega * d) }
      s2 += v * v
    }
    spread = Math.sqrt(s2 / m0)
  }
  // Standard error of the centre from the means of four blocks of the slow part (approximate:
  // the blocks are treated as independent).
  const bm: number[] = []
  {
    const validLo = vHi >= vLo ? vLo : 0
    const validN = vHi >= vLo ? vHi - vLo + 1 : m0
    const per = Math.floor(validN / 4)
    for (let q = 0; q < 4 && per > 0; q++) {
      let sb = 0
      for (let z = validLo + q * per; z < validLo + (q + 1) * per; z++) sb += Number.isFinite(slow[z]!) ? slow[z]! : e[z]!
      bm.push(sb / per)
    }
  }
  const se = bm.length >= 2 ? Math.sqrt(bm.reduce((acc, v) => acc + v * v, 0) / (bm.length * (bm.length - 1))) : 1
  let hSum = 0
  let hN = 0
  for (let k = lo; k <= hi; k++) if (bins.h[k]! > 0) { hSum += bins.h[k]!; hN++ }
  const harmonicity = hN > 0 ? hSum / hN : 0

  let vibrato: MeasuredHold['vibrato'] = null
  if (fit.vib) {
    const rateHz = fit.vib.omega / (2 * Math.PI)
    const g = Math.max(0.3, vibratoGain(rateHz, tr))
    // A sinusoid's peak is √2·RMS; below one period, the fitted sinusoid's amplitude.
    const extent = Number.isFinite(vibRms) ? Math.SQRT2 * vibRms : Math.hypot(fit.vib.a, fit.vib.b)
    vibrato = { rateHz: round(rateHz, 2), extentCents: round(extent / g, 1) }
  }
  const steadyStartS = bins.t[lo]! - BIN_S / 2
  const steadyEndS = bins.t[hi]! + BIN_S / 2
  // Several voices on the part (their spread about the moving centre is far above what one voice
  // shows): the centre is the mean of the harmonics' power-weighted frequencies, one vote per
  // harmonic heard (voices.ts), the track's own spread (beats, not unsteadiness) no longer counts
  // against the confidence, and the voices' spread is reported.
  let centreOut = centre
  let seOut = se
  let steadiness = 1 / (1 + (spread / 15) ** 2)
  let voiceSpreadCents: number | null = null
  // In a chord the other parts' partials beat with the part's harmonics: no voices are told apart.
  const vs = inChord ? null : voiceSpread(tr, steadyStartS, steadyEndS)
  const cc = vs && vs.cents >= SEVERAL_VOICES_CENTS && spread >= SEVERAL_VOICES_WANDER_CENTS ? harmonicCentroid(tr, h.expectedHz, steadyStartS, steadyEndS) : null
  // The harmonics' own centres: in a chord their weighted median is the centre; alone, their
  // disagreement (a sampled or real tone whose partials are not quite harmonic: its pitch depends
  // on which harmonics one listens to) bounds how well the centre is known.
  const hm = harmonicMedian(tr, h.expectedHz, steadyStartS, steadyEndS)
  // In a chord the part's own note must show its fundamental (a harmonic whose phase advances
  // coherently): a series without it is another note sharing some of its partials (the part
  // played an octave high, or a fifth low, or another part's note a fifth below).
  if (inChord && !(hm && tr.coherent[0])) {
    return notFound(h, startS, endS, 'no_pitch', `The expected note (${h.expectedHz.toFixed(2)} Hz) does not stand out of the chord here`)
  }
  if (hm && inChord) centreOut = hm.centreCents
  if (hm) seOut = Math.max(se, hm.seCents)
  if (vs && cc) {
    centreOut = cc.centreCents
    seOut = cc.seCents
    steadiness = 1
    voiceSpreadCents = round(vs.cents, 1)
  }
  const usable = Math.min(1, steadyS / Math.max(0.4, 0.5 * expectedDur))
  const conf = usable *
    Math.min(1, Math.max(0, (harmonicity - 0.5) / 0.4)) *
    steadiness *
    (1 / (1 + seOut * seOut)) *
    Math.min(1, steadyS / 0.4) *
    (clipWarn ? 0.9 : 1)
  // A part picked out of a chord: where another part's partial sounds on the same harmonics (an
  // octave or a fifth in the chord) the two cannot be told apart and the centre can move by a few
  // cents unseen, so such a hold is never reported as sure.
  const confOut = inChord ? Math.min(CHORD_CONFIDENCE_MAX, conf) : conf
  const detectedHz = h.expectedHz * Math.pow(2, centreOut / 1200)
  const out: MeasuredHold = {
    index: h.index,
    startS: round(startS, 3),
    endS: round(endS, 3),
    detectedHz: round(detectedHz, 5),
    spreadCents: round(spread, 2),
    slopeCentsPerS: round(fit.slope, 2),
    confidence: round(Math.max(0, Math.min(1, confOut)), 2),
    vibrato,
    reason: null,
    reasonCode: null,
    expectedHz: h.expectedHz,
    steadyStartS: round(steadyStartS, 3),
    steadyEndS: round(steadyEndS, 3),
    centreErrorCents: round(seOut, 3),
    voiceSpreadCents,
  }
  if (withTrace) out.trace = makeTrace(bins, h.expectedHz)
  return out
}

// 25-ms points of the binned track for charts.
function makeTrace (b: Binned, expectedHz: number): Array<[number, number]> {
  const out: Array<[number, number]> = []
  const group = 5
  for (let k = 0; k + group <= b.c.length; k += group) {
    let s = 0
    let c = 0
    for (let q = k; q < k + group; q++) if (Number.isFinite(b.c[q]!)) { s += b.c[q]!; c++ }
    if (c === 0) continue
    const t = (b.t[k]! + b.t[k + group - 1]!) / 2
    out.push([round(t, 3), round(expectedHz * Math.pow(2, s / c / 1200), 3)])
  }
  return out
}
