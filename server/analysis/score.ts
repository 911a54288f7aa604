// Scoring: a system-independent Measurement against the targets of one tuning system. Pure and
// cheap, so a take is re-scored against another system or reference pitch without decoding.
import type { TargetsResult } from '../../shared/tuning/index'
import { AnalysisError } from './errors'
import type { HoldReasonCode, MeasuredHold, Measurement, MeasurementWarning } from './types'

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
  // Fields beyond the command line's fixed shape.
  reasonCode: HoldReasonCode | null
  writtenNote: string | null
  equalHz: number
  ratio: string | null
  vibrato: { rateHz: number, extentCents: number } | null
  steadyStartS: number | null
  steadyEndS: number | null
  centreErrorCents: number | null
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
    /** Slope of cents-from-target against time over the take, cents per minute (negative = sagging flat). */
    driftCentsPerMin: number | null
    holdsFound: number
    holdsExpected: number
    /** Signed mean cents from target over the holds found. */
    meanCents: number | null
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

  // Drift: least-squares slope of cents-from-target against the time of each hold's steady middle.
  let drift: number | null = null
  if (found.length >= 2) {
    const ts = found.map(h => ((h.steadyStartS ?? h.startS) + (h.steadyEndS ?? h.endS)) / 2 / 60)
    const ys = found.map(h => h.centsFromTarget!)
    const tm = ts.reduce((s, v) => s + v, 0) / ts.length
    const ym = ys.reduce((s, v) => s + v, 0) / ys.length
    let sxx = 0
    let sxy = 0
    for (let i = 0; i < ts.length; i++) { sxx += (ts[i]! - tm) ** 2; sxy += (ts[i]! - tm) * (ys[i]! - ym) }
    // Needs the holds to span at least a second.
    if (sxx > 0 && Math.max(...ts) - Math.min(...ts) >= 1 / 60) drift = sxy / sxx
  }

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
      driftCentsPerMin: drift === null ? null : r3(drift),
      holdsFound: found.length,
      holdsExpected: holds.length,
      meanCents: mean === null ? null : r3(mean),
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
  const fromTarget = hz !== null ? cents(t.targetHz, hz) : null
  const fromEqual = hz !== null ? cents(t.equalHz, hz) : null
  const out: ReportHold = {
    index: m.index,
    note: t.note,
    member: t.member,
    startS: m.startS,
    endS: m.endS,
    targetHz: t.targetHz,
    detectedHz: hz,
    centsFromTarget: fromTarget === null ? null : r3(fromTarget),
    centsFromEqual: fromEqual === null ? null : r3(fromEqual),
    spreadCents: m.spreadCents,
    slopeCentsPerS: m.slopeCentsPerS,
    confidence: m.confidence,
    withinTolerance: fromTarget === null ? null : Math.abs(fromTarget) <= tolerance,
    reason: m.reason,
    reasonCode: m.reasonCode,
    writtenNote: t.writtenNote,
    equalHz: t.equalHz,
    ratio: t.ratio,
    vibrato: m.vibrato,
    steadyStartS: m.steadyStartS,
    steadyEndS: m.steadyEndS,
    centreErrorCents: m.centreErrorCents,
  }
  if (m.trace) out.trace = m.trace
  return out
}
