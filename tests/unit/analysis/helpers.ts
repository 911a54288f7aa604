// Shared helpers of the analysis tests: synthetic takes of known truth, drills, decoded audio.
import { synthTakeWithTruth } from '../../../server/analysis/synth'
import type { SynthHold, SynthSpec, SynthTimbre } from '../../../server/analysis/synth'
import type { DecodedAudio } from '../../../server/analysis/decode'
import type { ExpectedHold } from '../../../server/analysis/types'

export const cents = (hz: number, ref: number) => 1200 * Math.log2(hz / ref)
export const equalHz = (midi: number, a4 = 440) => a4 * Math.pow(2, (midi - 69) / 12)

/** Mono DecodedAudio from samples (what decodeAudio hands the measurer). */
export function audioOf (samples: Float32Array, sampleRate: number): DecodedAudio {
  return { samples, sampleRate, channels: 1, durationS: samples.length / sampleRate }
}

export interface HoldPlan {
  /** Drill timeline. */
  startS: number
  endS: number
  midi: number | null
  /** What the player actually produces, cents from the equal-tempered note (ignored for rests). */
  playedCents?: number
  /** Leave this hold out of the take (a missing chord). */
  skip?: boolean
  /** Play this frequency instead (wrong notes, octave errors). */
  playedHz?: number
  driftCentsPerS?: number
}

/**
 * A take of a plan: the take starts `leadInS` after the drill's zero and runs `tempoScale`
 * times slower; every hold starts 40 ms late and releases `gapS` before the next chord.
 */
export function takeOf (plan: HoldPlan[], opts: {
  sampleRate?: number, leadInS?: number, tempoScale?: number, gapS?: number, timbre?: SynthTimbre,
  snrDb?: number, vibrato?: SynthSpec['vibrato'], jitterCents?: number, seed?: number, tailS?: number,
  extra?: SynthHold[],
} = {}) {
  const sr = opts.sampleRate ?? 44100
  const lead = opts.leadInS ?? 1
  const k = opts.tempoScale ?? 1
  const gap = opts.gapS ?? 0.25
  const expected: ExpectedHold[] = plan.map((p, index) => ({
    index, startS: p.startS, endS: p.endS, midi: p.midi, expectedHz: p.midi === null ? 0 : equalHz(p.midi),
  }))
  const holds: SynthHold[] = []
  const playedIdx: number[] = []
  plan.forEach((p, i) => {
    if (p.midi === null || p.skip) return
    const hz = p.playedHz ?? equalHz(p.midi) * Math.pow(2, (p.playedCents ?? 0) / 1200)
    holds.push({ startS: lead + k * p.startS + 0.04, endS: lead + k * p.endS - gap, hz, driftCentsPerS: p.driftCentsPerS ?? 0 })
    playedIdx.push(i)
  })
  for (const e of opts.extra ?? []) holds.push(e)
  const last = plan[plan.length - 1]!
  const durationS = lead + k * last.endS + (opts.tailS ?? 0.8)
  const syn = synthTakeWithTruth({
    sampleRate: sr,
    durationS,
    holds,
    timbre: opts.timbre ?? 'voice-alto',
    snrDb: opts.snrDb ?? 35,
    seed: opts.seed ?? 11,
    ...(opts.vibrato ? { vibrato: opts.vibrato } : {}),
    ...(opts.jitterCents !== undefined ? { jitterCents: opts.jitterCents } : {}),
  })
  // Truth per plan index (the synthesised centre), undefined where nothing was played.
  const truth: Array<number | undefined> = plan.map(() => undefined)
  playedIdx.forEach((planIndex, j) => { truth[planIndex] = syn.holds[j]!.centreHz })
  return { samples: syn.samples, sampleRate: sr, expected, truth, durationS, synthHolds: syn.holds }
}

/** Consecutive chords of `beats` at `tempo` (one part) as a plan. */
export function planOf (notes: Array<number | null>, beats = 3, tempo = 60, playedCents: number[] = []): HoldPlan[] {
  const spb = 60 / tempo
  return notes.map((midi, i) => ({ startS: i * beats * spb, endS: (i + 1) * beats * spb, midi, playedCents: playedCents[i] ?? 0 }))
}
