import { z } from 'zod'
import { TuningError } from '../tuning/errors'
import type { TuningIssue } from '../tuning/errors'
import { parseKey, parseNote, parsePitchClass } from '../tuning/pitch'
import { parseScala } from '../tuning/scala'
import { INSTRUMENTS } from '../tuning/transpose'
import { jsonErrorPlace, plainIssueMessage, stripBidi } from '../text'
import { userText } from '../schemas/text'

/** Tuning systems a drill can be scored against (names are ours; the maths is the trade's). */
export const SYSTEM_NAMES = ['equal', 'just-root', 'just-tonic', 'just-common', 'pythagorean', 'meantone', 'scala'] as const
export type SystemName = (typeof SYSTEM_NAMES)[number]

export const A4_MIN = 415
export const A4_MAX = 466
export const TEMPO_MIN = 20
export const TEMPO_MAX = 300
/** Largest tolerance: beyond half a semitone a hold counts as a wrong note. */
export const TOLERANCE_MAX = 50
export const TITLE_MAX = 120
export const PART_NAME_MAX = 60
export const BEATS_MAX = 64

/**
 * What each drill field accepts, in words a director reads. The schema carries them, so the
 * editor's fields, its summary and the routes' 400 answers all say the same thing.
 */
export const DRILL_MESSAGES = {
  title: 'Give the drill a title',
  titleTooLong: `A title of at most ${TITLE_MAX} characters`,
  tempo: `A tempo from ${TEMPO_MIN} to ${TEMPO_MAX} beats per minute`,
  a4: `A reference pitch from ${A4_MIN} to ${A4_MAX} Hz`,
  tolerance: `A tolerance above 0 and at most ${TOLERANCE_MAX} cents`,
  partName: 'give the part a name',
  partNameTooLong: `a part name of at most ${PART_NAME_MAX} characters`,
  beats: `a length above 0 and at most ${BEATS_MAX} beats`,
  symbol: 'a chord symbol of at most 20 characters',
  note: 'a note name with octave such as Bb3 or F#4, or a rest',
} as const

/** Beats per minute. */
export const Tempo = z.number({ error: DRILL_MESSAGES.tempo }).min(TEMPO_MIN, DRILL_MESSAGES.tempo).max(TEMPO_MAX, DRILL_MESSAGES.tempo)
/** Reference pitch A4 in Hz. */
export const ReferencePitch = z.number({ error: DRILL_MESSAGES.a4 }).min(A4_MIN, DRILL_MESSAGES.a4).max(A4_MAX, DRILL_MESSAGES.a4)
/** Tolerance in ± cents. */
export const Tolerance = z.number({ error: DRILL_MESSAGES.tolerance }).positive(DRILL_MESSAGES.tolerance).max(TOLERANCE_MAX, DRILL_MESSAGES.tolerance)

/** Options of a tuning system; each system reads only the ones it needs. */
export const SystemOptions = z.object({
  name: z.enum(SYSTEM_NAMES),
  /**
   * just-root / just-common: the dominant (and suspended) seventh as 7/4 ('harmonic') or 16/9
   * ('5-limit'). Minor-seventh chords always take 9/5 and half-diminished sevenths 16/9.
   */
  seventh: z.enum(['harmonic', '5-limit']).default('harmonic'),
  /** just-tonic / meantone / scala: the tonic (pitch class such as "Bb"); defaults to the drill's key. */
  tonic: z.string().min(1).optional(),
  /**
   * pythagorean / meantone: first note of the chain of fifths. Defaults to three fifths below a major
   * tonic (E♭ for C major) or four below a minor one (A♭ for C minor), so the key's own chords avoid the wolf.
   */
  start: z.string().min(1).optional(),
  /** pythagorean / meantone: the note whose fifth above is the wolf (defaults to 11 fifths above start). */
  wolf: z.string().min(1).optional(),
  /** meantone: fraction of the syntonic comma each fifth is narrowed by ("1/4", "1/6", 0.25). */
  fraction: z.union([z.string().regex(/^\s*\d+\s*\/\s*\d+\s*$/, 'a fraction such as 1/4'), z.number().positive().max(1)]).default('1/4'),
  /** scala: the .scl file's text. */
  scala: z.string().max(200_000).optional(),
}).superRefine((sys, ctx) => {
  for (const field of ['tonic', 'start', 'wolf'] as const) {
    const v = sys[field]
    if (v !== undefined) {
      try { parsePitchClass(v) } catch (e) { ctx.addIssue({ code: 'custom', path: [field], message: (e as Error).message }) }
    }
  }
  if (typeof sys.fraction === 'string') {
    const [n, d] = sys.fraction.split('/').map(x => Number(x.trim()))
    if (!(n! > 0) || !(d! > 0) || n! > d!) ctx.addIssue({ code: 'custom', path: ['fraction'], message: 'the comma fraction must be above 0 and at most 1, such as 1/4' })
  }
  if (sys.name === 'scala') {
    if (!sys.scala) ctx.addIssue({ code: 'custom', path: ['scala'], message: 'the scala system needs the text of a Scala .scl file' })
    else {
      try { parseScala(sys.scala) } catch (e) { ctx.addIssue({ code: 'custom', path: ['scala'], message: (e as Error).message }) }
    }
  }
})
export type SystemOptions = z.infer<typeof SystemOptions>

export const DrillPart = z.object({
  name: userText(PART_NAME_MAX, 1, { min: DRILL_MESSAGES.partName, max: DRILL_MESSAGES.partNameTooLong }),
  /** Instrument id from shared/tuning/transpose.ts (e.g. 'voice-soprano', 'trumpet-bb'); concert pitch when absent. */
  instrument: z.string().min(1).optional(),
})

export const DrillChord = z.object({
  /** Length in beats (the tempo's beat). */
  beats: z.number({ error: DRILL_MESSAGES.beats }).positive(DRILL_MESSAGES.beats).max(BEATS_MAX, DRILL_MESSAGES.beats),
  /** Optional chord symbol ("C", "Am7", "G7/B"); settles ambiguous sets. */
  symbol: userText(20, 1, { min: DRILL_MESSAGES.symbol, max: DRILL_MESSAGES.symbol }).optional(),
  /** Concert-pitch note with octave per part name ("Bb3", "F#4", "Cx5"), or null for a rest. */
  notes: z.record(z.string(), z.string().min(2, DRILL_MESSAGES.note).max(6, DRILL_MESSAGES.note).nullable())
    // Keyed by part name, cleaned as part names are (bidirectional controls, outer spaces).
    .transform(notes => Object.fromEntries(Object.entries(notes).map(([part, note]) => [stripBidi(part).trim(), note]))),
})

/** A drill document: what a director authors, imports from MIDI, and the analysis aligns to. */
export const DrillDocument = z.object({
  title: userText(TITLE_MAX, 1, { min: DRILL_MESSAGES.title, max: DRILL_MESSAGES.titleTooLong }),
  /** Key as "<tonic> major|minor", e.g. "Eb major". */
  key: z.string().regex(/^[A-Ga-g](#{1,2}|b{1,2}|x)?\s+(major|minor)$/, 'a key such as "Eb major"').default('C major'),
  tempo: Tempo.default(60),
  a4: ReferencePitch.default(440),
  system: SystemOptions.default({ name: 'equal', seventh: 'harmonic', fraction: '1/4' }),
  tolerance: Tolerance.default(10),
  parts: z.array(DrillPart).min(1).max(16),
  chords: z.array(DrillChord).min(1).max(500),
}).superRefine((drill, ctx) => {
  const names = new Set<string>()
  try { parseKey(drill.key) } catch (e) { ctx.addIssue({ code: 'custom', path: ['key'], message: (e as Error).message }) }
  drill.parts.forEach((p, i) => {
    if (names.has(p.name)) ctx.addIssue({ code: 'custom', path: ['parts', i, 'name'], message: `duplicate part name "${p.name}"` })
    names.add(p.name)
    if (p.instrument !== undefined && !Object.hasOwn(INSTRUMENTS, p.instrument)) {
      ctx.addIssue({ code: 'custom', path: ['parts', i, 'instrument'], message: `"${p.instrument}" is not an instrument we know (for example trumpet-bb, horn-f, alto-sax-eb, voice-tenor)` })
    }
  })
  drill.chords.forEach((c, i) => {
    if (Object.keys(c.notes).length === 0) {
      ctx.addIssue({ code: 'custom', path: ['chords', i, 'notes'], message: `chord ${i + 1} is empty: give every part a note or a rest` })
      return
    }
    for (const name of names) {
      if (!(name in c.notes)) ctx.addIssue({ code: 'custom', path: ['chords', i, 'notes', name], message: `chord ${i + 1} has no note or rest for part "${name}"` })
    }
    for (const [name, note] of Object.entries(c.notes)) {
      if (!names.has(name)) ctx.addIssue({ code: 'custom', path: ['chords', i, 'notes', name], message: `chord ${i + 1} names unknown part "${name}"` })
      else if (note !== null) {
        try { parseNote(note) } catch (e) { ctx.addIssue({ code: 'custom', path: ['chords', i, 'notes', name], message: `chord ${i + 1}, part "${name}": ${(e as Error).message}` }) }
      }
    }
  })
})
export type DrillDocument = z.infer<typeof DrillDocument>
export type DrillInput = z.input<typeof DrillDocument>

/** Joins a zod issue path as "chords.2.notes.Alto" (indexes from 0). */
export function issuePath(path: readonly PropertyKey[]): string {
  return path.map(p => String(p)).join('.') || '(document)'
}

function fromZod(error: z.ZodError, what: string, prefix: string): TuningError {
  const issues: TuningIssue[] = error.issues.map(i => ({ path: issuePath([...(prefix ? [prefix] : []), ...i.path]), message: i.message }))
  const shown = issues.slice(0, 5).map(i => `${i.path}: ${i.message}`).join('; ')
  const more = issues.length > 5 ? ` (and ${issues.length - 5} more)` : ''
  return new TuningError(`invalid_${what}`, `The ${what} is not valid: ${shown}${more}`, issues[0]?.path ?? null, issues)
}

/**
 * Validates a drill document (an object or its JSON text) and fills in defaults. Throws
 * TuningError('invalid_json' | 'invalid_drill') whose message and `issues` name each failing field.
 */
export function parseDrill(input: unknown): DrillDocument {
  let value = input
  if (typeof input === 'string') {
    try { value = JSON.parse(input) } catch (e) {
      const place = jsonErrorPlace(input)
      throw new TuningError('invalid_json', `The drill document is not valid JSON${place ? ` (${place})` : ''}`, place)
    }
  }
  const result = DrillDocument.safeParse(value, { error: plainIssueMessage })
  if (!result.success) throw fromZod(result.error, 'drill', '')
  return result.data
}

/** Validates tuning-system options and fills in defaults; errors name the field as "system.<field>". */
export function parseSystem(input: unknown): SystemOptions {
  const result = SystemOptions.safeParse(input, { error: plainIssueMessage })
  if (!result.success) throw fromZod(result.error, 'system', 'system')
  return result.data
}
