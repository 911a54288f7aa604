// Scoring: a system-independent Measurement against the targets of one tuning system. Pure and
// cheap, so a take is re-scored against another system or reference pitch without decoding.
import { Note } from '@tonaljs/tonal'
import type { TargetsResult } from '../../shared/tuning/index'
import { fitDrift } from './drift'
import type { HoldTiming } from './timing'
import { AnalysisError } from './errors'
import type { HoldReasonCode, MeasuredHold, Measurement, MeasurementWarning } from './types'
import { WRONG_NOTE_CENTS } from './types'

export interface ReportHold {
  index: number
  note: string
  member: string | null
  startS: number
  endS: number
  targetHz: number
  detectedHz: number | null
  centsFromTarget: number | null
  centsFromEqual: number | null
  spreadCents: number | null
  slopeCentsPerS: number | null
  confidence: number
  withinTolerance: boolean | null
  reason: string | null
  /** Nearest equal-tempered note (concert) of what was heard, e.g. "E4"; null when nothing was heard. */
  heardNote: string | null
  /** Signed cents of the heard pitch from the expected note's equal-tempered pitch; null when nothing was heard. */
  heardCentsFromExpected: number | null
  // Fields beyond the command line's fixed shape.
  reasonCode: HoldReasonCode | null
  writtenNote: string | null
  equalHz: number
  ratio: string | null
  vibrato: { rateHz: number, extentCents: number } | null
  steadyStartS: number | null
  steadyEndS: number | null
  centreErrorCents: number | null
  /** Several voices on the part: the spread of their pitches about their centre (RMS, cents); null for one voice. */
  voiceSpreadCents: number | null
  /** Onset and release found, and how early or late against the beat under the take's time map; null when not placed. */
  timing: HoldTiming | null
  trace?: Array<[number, number]>
}

export interface TakeReport {
  take: { durationS: number, sampleRate: number, channels: number }
  system: string
  a4: number
  part: string
  holds: ReportHold[]
  summary: {
    /** Mean |cents from target| over the holds found (null when none was found). */
    meanAbsCents: number | null
    /** Share (0–1) of the holds found that are within ± tolerance. */
    withinToleranceShare: number | null
    /** Slope of cents-from-target against time over the take, cents per minute (negative =
     *  sagging flat), from a robust fit; null when its uncertainty is not smaller than its size. */
    driftCentsPerMin: number | null
    holdsFound: number
    holdsExpected: number
    /** Signed mean cents from target over the holds found. */
    meanCents: number | null
    /** Standard error of the drift, cents per minute (null with fewer than three holds measured). */
    driftUncertaintyCentsPerMin: number | null
    /** Holds where a different note was heard (more than 50 ¢ from the expected note). */
    wrongNotes: number
  }
  tolerance: number
  /** Mean signed cents from target per chord member over the holds found. */
  memberBias: Record<string, number>
  memberCounts: Record<string, number>
  description: string
  warnings: MeasurementWarning[]
  timeScale: number
  offsetS: number
}

const r3 = (v: number) => Math.round(v * 1000) / 1000
const cents = (from: number, to: number) => 1200 * Math.log2(to / from)

/** Scores a measurement against a system's targets for one part (± tolerance in cents). */
export function scoreMeasurement (measurement: Measurement, targets: TargetsResult, part: string, tolerance: number): TakeReport {
  if (!(tolerance > 0) || !Number.isFinite(tolerance)) throw new RangeError('tolerance must be a positive number of cents')
  const partNotes = new Map<number, TargetsResult['chords'][number]['notes'][number]>()
  let partSeen = false
  for (const c of targets.chords) {
    for (const n of c.notes) {
      if (n.part !== part) continue
      partSeen = true
      partNotes.set(c.index, n)
    }
  }
  if (!partSeen && measurement.holds.length > 0) throw new AnalysisError('unknown_part', { part })

  const holds: ReportHold[] = []
  for (const m of measurement.holds) {
    const t = partNotes.get(m.index)
    if (!t) continue
    holds.push(scoreHold(m, t, tolerance))
  }
  const found = holds.filter(h => h.centsFromTarget !== null)
  const absMean = found.length ? found.reduce((s, h) => s + Math.abs(h.centsFromTarget!), 0) / found.length : null
  const mean = found.length ? found.reduce((s, h) => s + h.centsFromTarget!, 0) / found.length : null
  const within = found.length ? found.filter(h => h.withinTolerance).length / found.length : null

  // Drift: robust slope of cents-from-target against the time of each hold's steady middle.
  const drift = fitDrift(found.map(h => ({
    tMin: ((h.steadyStartS ?? h.startS) + (h.steadyEndS ?? h.endS)) / 2 / 60,
    cents: h.centsFromTarget!,
    errorCents: h.centreErrorCents,
  })))

  const memberSum: Record<string, number> = {}
  const memberCounts: Record<string, number> = {}
  for (const h of found) {
    if (!h.member) continue
    memberSum[h.member] = (memberSum[h.member] ?? 0) + h.centsFromTarget!
    memberCounts[h.member] = (memberCounts[h.member] ?? 0) + 1
  }
  const memberBias: Record<string, number> = {}
  for (const k of Object.keys(memberSum)) memberBias[k] = r3(memberSum[k]! / memberCounts[k]!)

  return {
    take: { ...measurement.take },
    system: targets.system,
    a4: targets.a4,
    part,
    holds,
    summary: {
      meanAbsCents: absMean === null ? null : r3(absMean),
      withinToleranceShare: within === null ? null : r3(within),
      driftCentsPerMin: drift.centsPerMin === null ? null : r3(drift.centsPerMin),
      holdsFound: found.length,
      holdsExpected: holds.length,
      meanCents: mean === null ? null : r3(mean),
      driftUncertaintyCentsPerMin: drift.uncertaintyCentsPerMin === null ? null : r3(drift.uncertaintyCentsPerMin),
      wrongNotes: holds.filter(h => h.reasonCode === 'wrong_note').length,
    },
    tolerance,
    memberBias,
    memberCounts,
    description: targets.description,
    warnings: [...(measurement.warnings ?? [])],
    timeScale: measurement.timeScale,
    offsetS: measurement.offsetS,
  }
}

function scoreHold (m: MeasuredHold, t: TargetsResult['chords'][number]['notes'][number], tolerance: number): ReportHold {
  const hz = m.detectedHz
  const fromEqual = hz !== null ? cents(t.equalHz, hz) : null
  // One rule wherever the hold came from: more than ~half a semitone from the expected note is a
  // different note (octave errors included), and a different note is never a tuning deviation.
  const wrong = m.reasonCode === 'wrong_note' || m.reasonCode === 'octave_high' || m.reasonCode === 'octave_low' ||
    (fromEqual !== null && Math.abs(fromEqual) > WRONG_NOTE_CENTS)
  const fromTarget = hz !== null && !wrong ? cents(t.targetHz, hz) : null
  const heard = fromEqual === null ? null : heardNoteName(t.note, t.midi, fromEqual)
  let reason = m.reason
  if (wrong) reason = wrongNoteReason(t.note, heard, fromEqual, m.reasonCode)
  const out: ReportHold = {
    index: m.index,
    note: t.note,
    member: t.member,
    startS: m.startS,
    endS: m.endS,
    targetHz: t.targetHz,
    detectedHz: hz,
    centsFromTarget: fromTarget === null ? null : r3(fromTarget),
    centsFromEqual: fromEqual === null || wrong ? null : r3(fromEqual),
    spreadCents: m.spreadCents,
    slopeCentsPerS: m.slopeCentsPerS,
    confidence: m.confidence,
    withinTolerance: fromTarget === null ? null : Math.abs(fromTarget) <= tolerance,
    reason,
    heardNote: heard,
    heardCentsFromExpected: fromEqual === null ? null : r3(fromEqual),
    reasonCode: wrong ? 'wrong_note' : m.reasonCode,
    writtenNote: t.writtenNote,
    equalHz: t.equalHz,
    ratio: t.ratio,
    vibrato: m.vibrato,
    steadyStartS: m.steadyStartS,
    steadyEndS: m.steadyEndS,
    centreErrorCents: m.centreErrorCents,
    voiceSpreadCents: m.voiceSpreadCents ?? null,
    timing: m.timing ?? null,
  }
  if (m.trace) out.trace = m.trace
  return out
}

/** Nearest equal-tempered note to a pitch `centsFromEqual` away from the expected note, spelled
 *  like the expected note when it is the same pitch class, else with flats after a flat note and
 *  sharps otherwise. */
export function heardNoteName (expected: string, expectedMidi: number, centsFromEqual: number): string | null {
  if (!Number.isFinite(centsFromEqual)) return null
  const semis = Math.round(centsFromEqual / 100)
  const midi = expectedMidi + semis
  if (midi < 0 || midi > 127) return null
  const e = Note.get(expected)
  if (!e.empty && e.oct !== undefined && e.oct !== null && semis % 12 === 0) return `${e.pc}${e.oct + semis / 12}`
  return !e.empty && e.alt < 0 ? Note.fromMidi(midi) : Note.fromMidiSharps(midi)
}

function wrongNoteReason (expected: string, heard: string | null, fromEqual: number | null, code: HoldReasonCode | null): string {
  if (heard === null || fromEqual === null) {
    const dir = code === 'octave_low' ? 'below' : 'above'
    return `Heard a different note: an octave ${dir} ${expected}`
  }
  const c = Math.round(fromEqual * 10) / 10
  return `Heard ${heard} instead of ${expected} (${c > 0 ? '+' : c < 0 ? '−' : ''}${Math.abs(c).toFixed(1)} ¢ from ${expected})`
}
