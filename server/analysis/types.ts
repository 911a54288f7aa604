import type { HoldTiming } from './timing'

// Shapes shared by the analysis modules. A Measurement holds only what was measured (Hz, times,
// spread, vibrato): it does not depend on the tuning system, so a take can be re-scored against
// any system or reference pitch without decoding it again.

/** One held note the part is expected to play, on the drill's own timeline. */
export interface ExpectedHold {
  /** Chord index in the drill. */
  index: number
  /** Start and end on the drill timeline (seconds from the first beat). */
  startS: number
  endS: number
  /** MIDI note, or null for a rest. */
  midi: number | null
  /** Where to look: the equal-tempered frequency of the note at the drill's reference pitch. */
  expectedHz: number
}

/** Why a hold has no measured pitch (stable codes; `reason` carries the sentence). */
export type HoldReasonCode =
  | 'no_pitch' // nothing voiced near the expected note where the chord should be
  | 'beyond_take' // the take ends before or during the chord, and nothing was found
  | 'octave_high' | 'octave_low' // measurements stored before octave errors became wrong notes
  | 'wrong_note' // a steady pitch more than 50 ¢ from the expected note (octave errors included); detectedHz keeps what was heard
  | 'too_short' // too little steady sound to measure

export interface MeasuredHold {
  index: number
  /** Where the hold was found in the take (or, when not found, where it was expected), seconds. */
  startS: number
  endS: number
  /** Steady-state frequency (attack and release trimmed, vibrato averaged), or null when nothing
   *  was heard. Kept for wrong notes (reasonCode wrong_note): the pitch that was heard instead. */
  detectedHz: number | null
  /** RMS about the centre of the steady pitch averaged over one vibrato period (0.2 s without vibrato), trend included, cents. */
  spreadCents: number | null
  /** Linear trend of the pitch within the steady part, cents per second. */
  slopeCentsPerS: number | null
  /** 0–1: how much the number can be trusted (usable share, harmonicity, spread, precision, length). */
  confidence: number
  /** Vibrato rate (Hz) and extent (peak deviation from the centre, cents), or null when none. */
  vibrato: { rateHz: number, extentCents: number } | null
  reason: string | null
  reasonCode: HoldReasonCode | null
  /** The frequency the hold was searched near (equal temperament at the drill's A4). */
  expectedHz: number
  /** The stretch the centre was measured over. */
  steadyStartS: number | null
  steadyEndS: number | null
  /** Standard error of the centre, cents (approximate: from four block means of the slow residual,
   *  or, for several voices, of the harmonics' centre, one vote per harmonic heard). */
  centreErrorCents: number | null
  /** Several voices on the part (a section recorded together): the spread of their pitches about
   *  their centre (RMS, cents: detuning and the vibrato they do not share); null for one voice. */
  voiceSpreadCents?: number | null
  /** Decimated f0 track over the hold for charts: [seconds, Hz]. */
  trace?: Array<[number, number]>
  /** Onset and release found, and how early or late against the beat under the take's time map (holds placed in the take only). */
  timing?: HoldTiming
}

export interface MeasurementWarning {
  code: 'clipping' | 'low_level' | 'holds_missing' | 'whole_chord'
  message: string
}

export interface Measurement {
  take: { durationS: number, sampleRate: number, channels: number }
  holds: MeasuredHold[]
  /** Global map from the drill timeline to the take: t_take = offsetS + timeScale·t_drill. */
  timeScale: number
  offsetS: number
  warnings: MeasurementWarning[]
  /** Engine version, so stored measurements can be told apart after changes. */
  engine: string
}

/** Version tag stored with every measurement. */
export const ENGINE_VERSION = 'driftline-analysis-1'

/** Largest distance of a steady centre from the expected note's equal-tempered pitch before it counts as a wrong note (about half a semitone). */
export const WRONG_NOTE_CENTS = 50
