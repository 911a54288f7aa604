// Entry of the analysis engine: decode → expected holds from the drill → measure → score.
import type { DrillDocument, SystemName, SystemOptions } from '../../shared/drill/schema'
import { parseDrill } from '../../shared/drill/schema'
import { computeTargets, midiToHz, noteToMidi } from '../../shared/tuning/index'
import { decodeAudio } from './decode'
import { AnalysisError } from './errors'
import { measureTake } from './measure'
import { scoreMeasurement } from './score'
import type { TakeReport } from './score'
import type { ExpectedHold, Measurement } from './types'

export { measureTake, WRONG_NOTE_CENTS } from './measure'
export type { MeasureOptions } from './measure'
export { scoreMeasurement } from './score'
export type { TakeReport, ReportHold } from './score'
export { alignHolds } from './align'
export { coarseTrack, refinePitch } from './pitch'
export { synthTake, synthTakeWithTruth } from './synth'
export type { SynthSpec, SynthHold, SynthTimbre } from './synth'
export type { ExpectedHold, Measurement, MeasuredHold, HoldReasonCode, MeasurementWarning } from './types'
export { ENGINE_VERSION } from './types'

export interface AnalyzeOptions {
  /** Tuning system to score against (a name or options); the drill's own when absent. */
  system?: SystemName | Partial<SystemOptions>
  /** Reference pitch A4 for the targets (and for where to search); the drill's when absent. */
  a4?: number
  /** ± cents; the drill's when absent. */
  tolerance?: number
  onProgress?: (fraction: number) => void
  /** Decoder limits (defaults 200 MiB, 20 minutes). */
  maxBytes?: number
  maxDurationS?: number
}

/** The holds a part should play, on the drill timeline (rests included with midi null). */
export function expectedHolds (drillInput: DrillDocument | unknown, part: string, a4?: number): ExpectedHold[] {
  const drill = parseDrill(drillInput)
  if (!drill.parts.some(p => p.name === part)) {
    throw new AnalysisError('unknown_part', { part, parts: drill.parts.map(p => p.name) }, `The drill has no part "${part}"`)
  }
  const ref = a4 ?? drill.a4
  const secPerBeat = 60 / drill.tempo
  const out: ExpectedHold[] = []
  let beat = 0
  drill.chords.forEach((c, index) => {
    const note = c.notes[part] ?? null
    const startS = beat * secPerBeat
    beat += c.beats
    const endS = beat * secPerBeat
    if (note === null) {
      out.push({ index, startS, endS, midi: null, expectedHz: 0 })
      return
    }
    const midi = noteToMidi(note)
    out.push({ index, startS, endS, midi, expectedHz: midiToHz(midi, ref) })
  })
  return out
}

/** Decodes a take, measures the part's holds and scores them; progress goes to opts.onProgress. */
export async function analyzeTake (bytes: Uint8Array, drillInput: DrillDocument | unknown, part: string, opts: AnalyzeOptions = {}): Promise<{ measurement: Measurement, report: TakeReport }> {
  const progress = opts.onProgress ?? (() => {})
  const drill = parseDrill(drillInput)
  const expected = expectedHolds(drill, part, opts.a4)
  if (!expected.some(h => h.midi !== null)) {
    throw new AnalysisError('no_holds', { reason: 'part_rests', part }, 'This part rests throughout the drill: there is nothing to measure')
  }
  progress(0)
  const audio = await decodeAudio(bytes, {
    ...(opts.maxBytes !== undefined ? { maxBytes: opts.maxBytes } : {}),
    ...(opts.maxDurationS !== undefined ? { maxDurationS: opts.maxDurationS } : {}),
  })
  progress(0.1)
  const measurement = measureTake(audio, expected, { onProgress: f => progress(0.1 + 0.85 * f) })
  const system = typeof opts.system === 'string' ? { name: opts.system } : opts.system
  const targets = computeTargets(drill, system ?? drill.system, opts.a4 ?? drill.a4)
  const report = scoreMeasurement(measurement, targets, part, opts.tolerance ?? drill.tolerance)
  progress(1)
  return { measurement, report }
}
