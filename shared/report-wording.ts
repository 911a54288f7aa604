// How a take report's holds and figures are put into words, the same way on every screen and on
// the command line: a wrong note names the note heard and how far it is from the expected one
// (never a tuning deviation), and a drift without enough evidence says so instead of a number.
// Pure TypeScript (no Vue, no Nitro) so pages, components and the CLI share one wording.
import { formatNumber } from './deviation'

/** A hold further than this from its expected note's equal-tempered pitch is a wrong note. */
export const WRONG_NOTE_CENTS = 50

/** Reason codes the analysis gives a hold where a different note than the expected one was heard. */
const WRONG_CODES = new Set(['wrong_note', 'octave_high', 'octave_low'])

/** What the wording needs from a hold (the report hold carries more). */
export interface WordedHold {
  note: string | null
  detectedHz: number | null
  centsFromTarget?: number | null
  centsFromEqual?: number | null
  reason?: string | null
  reasonCode?: string | null
  heardNote?: string | null
  heardCentsFromExpected?: number | null
}

export interface WrongNote {
  /** Nearest equal-tempered note of what was heard (concert), or null when only the reason says what it was. */
  heardNote: string | null
  /** Signed cents from the expected note's equal-tempered pitch, or null when unknown. */
  cents: number | null
  /** The expected (concert) note. */
  expected: string | null
}

const NAMES = ['C', 'C#', 'D', 'Eb', 'E', 'F', 'F#', 'G', 'Ab', 'A', 'Bb', 'B']
const LETTER: Record<string, number> = { C: 0, D: 2, E: 4, F: 5, G: 7, A: 9, B: 11 }

/** MIDI number of a plain note name ("Bb3", "F#4", "C-1"), or null. */
function midiOf(name: string): number | null {
  const m = /^([A-G])(bb|b|##|#|x)?(-?\d+)$/.exec(name.trim())
  if (!m) return null
  const alt = { 'bb': -2, 'b': -1, '': 0, '#': 1, '##': 2, 'x': 2 }[m[2] ?? '']!
  return LETTER[m[1]!]! + alt + 12 * (Number(m[3]) + 1)
}

function nameOf(midi: number): string {
  return `${NAMES[((midi % 12) + 12) % 12]}${Math.floor(midi / 12) - 1}`
}

/**
 * The wrong note of a hold, or null when the hold is not one. A hold is a wrong note when the
 * analysis says so (`wrong_note`, or an octave off), or, in reports stored before the analysis
 * told wrong notes apart, when its pitch is more than half a semitone from the expected note's
 * equal-tempered pitch: the heard note is then the expected one moved by the nearest number of
 * semitones.
 */
export function wrongNote(h: WordedHold): WrongNote | null {
  const expected = h.note ?? null
  if (h.reasonCode && WRONG_CODES.has(h.reasonCode)) {
    const cents = finite(h.heardCentsFromExpected)
    let heard = h.heardNote ?? null
    if (!heard && cents !== null && expected) {
      const m = midiOf(expected)
      if (m !== null) heard = nameOf(m + Math.round(cents / 100))
    }
    return { heardNote: heard, cents, expected }
  }
  const fromEqual = finite(h.centsFromEqual)
  if (h.detectedHz != null && fromEqual !== null && Math.abs(fromEqual) > WRONG_NOTE_CENTS && expected) {
    const m = midiOf(expected)
    return { heardNote: m === null ? null : nameOf(m + Math.round(fromEqual / 100)), cents: fromEqual, expected }
  }
  return null
}

/** "+300 ¢" / "−1200 ¢": whole cents with a true minus sign. */
export function formatWholeCents(c: number): string {
  return formatNumber(c, 0, '¢', { signed: true })
}

/**
 * "Wrong note: heard E4, +300 ¢ from the expected C4", or null when the hold is not a wrong note.
 * `note` formats note names for display (the pages write real accidentals).
 */
export function wrongNoteText(h: WordedHold, note: (name: string) => string = n => n): string | null {
  const w = wrongNote(h)
  if (!w) return null
  const expected = w.expected ? ` the expected ${note(w.expected)}` : ' the expected note'
  if (w.heardNote && w.cents !== null) return `Wrong note: heard ${note(w.heardNote)}, ${formatWholeCents(w.cents)} from${expected}`
  if (w.heardNote) return `Wrong note: heard ${note(w.heardNote)} instead of${expected}`
  return `Wrong note: ${h.reason ? lowerFirst(h.reason) : `not${expected}`}`
}

function lowerFirst(s: string): string {
  return s ? s[0]!.toLowerCase() + s.slice(1) : s
}

/** How a hold is shown: a measured tuning figure, a wrong note, or no pitch at all. */
export function holdKind(h: WordedHold): 'measured' | 'wrong' | 'missing' {
  if (wrongNote(h)) return 'wrong'
  if (h.detectedHz == null || finite(h.centsFromTarget) === null) return 'missing'
  return 'measured'
}

/** The words shown when the drift has too few holds behind it to be a figure. */
export const DRIFT_TOO_FEW = 'not enough holds'

/** "+1.2 ¢/min", or "not enough holds" when the report gives no drift (too few holds for a slope). */
export function driftText(driftCentsPerMin: number | null | undefined): string {
  const d = finite(driftCentsPerMin)
  return d === null ? DRIFT_TOO_FEW : formatNumber(d, 1, '¢/min', { signed: true })
}

/** Within this many seconds of the beat a hold's start reads "on the beat". */
export const ON_BEAT_S = 0.05

/** What the wording needs of a hold's timing (the report's `timing`). */
export interface WordedTiming {
  start: 'onset' | 'chord_boundary'
  fromBeatS: number | null
}

/**
 * Where a hold started against its beat under the take's time map: "on the beat", "0.12 s late",
 * "0.08 s early", or, for a repeated note held through with no new attack, "held over (no new
 * attack)". A dash when the hold was not placed.
 */
export function timingText(t: WordedTiming | null | undefined): string {
  if (!t) return '—'
  if (t.start === 'chord_boundary') return 'held over (no new attack)'
  const d = finite(t.fromBeatS)
  if (d === null) return '—'
  if (Math.abs(d) < ON_BEAT_S) return 'on the beat'
  return `${Math.abs(d).toFixed(2)} s ${d > 0 ? 'late' : 'early'}`
}

/** "voices about 14 ¢ apart" for a hold sung by several voices; null for one voice. */
export function voicesText(voiceSpreadCents: number | null | undefined): string | null {
  const v = finite(voiceSpreadCents)
  return v === null ? null : `voices about ${Math.round(v)} ¢ apart`
}

/**
 * Cents either side of a hold's centre within which its true centre lies: two standard errors
 * (about 95 % of a normally distributed estimate, common practice) plus a floor for what the
 * standard error leaves out (a tone whose partials are not quite harmonic, the stretch of the
 * hold the centre is taken over). With the floor at 0.25 ¢ the range held the truth on 95 % of
 * the sampled corpus's measured holds (instruments, one singer and sections whose truth two
 * independent estimators agree on; `npm run bench:analysis` prints the figure). Null when the
 * analysis gave no standard error.
 */
export const CENTRE_RANGE_FLOOR_CENTS = 0.25

export function centreRangeCents(centreErrorCents: number | null | undefined): number | null {
  const se = finite(centreErrorCents)
  if (se === null || se < 0) return null
  return Math.ceil((2 * se + CENTRE_RANGE_FLOOR_CENTS) * 10 - 1e-9) / 10
}

/** "±1.4 ¢" (the centre's range, see centreRangeCents); null when unknown. */
export function centreRangeText(centreErrorCents: number | null | undefined): string | null {
  const r = centreRangeCents(centreErrorCents)
  return r === null ? null : `±${formatNumber(r, 1, '¢')}`
}

/** Holds sung by several voices that last less than this (seconds) are "short" for the summary. */
export const SEVERAL_VOICES_LONG_S = 3

/** Above this median ± (cents) over short holds sung by several voices, the summary says so. */
export const SEVERAL_VOICES_WIDE_CENTS = 1.5

/**
 * A note for the take's summary when holds sung by several voices at once were short (under
 * SEVERAL_VOICES_LONG_S) and their centres are known only roughly (median ± over them above
 * SEVERAL_VOICES_WIDE_CENTS); null otherwise. The voices' beats need time to average out: on the
 * sampled corpus's sections (`npm run bench:analysis`) holds of about 1.8 s came within
 * 0.7 / 3.3 ¢ (median / 95th percentile) of the voices' mean with a median ± of 2.6 ¢, long tones
 * of 3–5 s within 0.4 / 1.5 ¢ with a median ± of 2.1 ¢.
 */
export function severalVoicesNote(holds: ReadonlyArray<{ voiceSpreadCents?: number | null, centreErrorCents?: number | null, startS?: number | null, endS?: number | null }>): string | null {
  const ranges = holds
    .filter((h) => {
      const a = finite(h.startS)
      const b = finite(h.endS)
      return finite(h.voiceSpreadCents) !== null && a !== null && b !== null && b - a < SEVERAL_VOICES_LONG_S
    })
    .map(h => centreRangeCents(h.centreErrorCents))
    .filter((r): r is number => r !== null)
    .sort((a, b) => a - b)
  if (!ranges.length) return null
  const mid = ranges.length >> 1
  const median = ranges.length % 2 ? ranges[mid]! : (ranges[mid - 1]! + ranges[mid]!) / 2
  if (!(median > SEVERAL_VOICES_WIDE_CENTS)) return null
  const n = ranges.length
  return `${n} ${n === 1 ? 'hold' : 'holds'} of under ${SEVERAL_VOICES_LONG_S} seconds ${n === 1 ? 'was' : 'were'} sung by several voices at once. ` +
    `Their beats blur the centre of a short hold: ${n === 1 ? 'it is' : 'these are'} known to within ±${formatNumber(median, 1, '¢')}${n === 1 ? '' : ' (median)'}. ` +
    `Holding each chord for ${SEVERAL_VOICES_LONG_S} seconds or more narrows it.`
}

function finite(v: number | null | undefined): number | null {
  return typeof v === 'number' && Number.isFinite(v) ? v : null
}

/**
 * A system's description with the reference pitch named once: "Equal temperament, A4 = 440 Hz"
 * already names it; other descriptions get ", A4 = 442 Hz" added.
 */
export function withReferencePitch(description: string, a4: number | null | undefined): string {
  const d = description.trim()
  if (typeof a4 !== 'number' || !Number.isFinite(a4) || /\bA4\s*=/.test(d)) return d
  return `${d}, A4 = ${a4} Hz`
}
