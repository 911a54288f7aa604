import { z } from 'zod'

/** Tuning systems a drill can be scored against (names are ours; the maths is the trade's). */
export const SYSTEM_NAMES = ['equal', 'just-root', 'just-tonic', 'just-common', 'pythagorean', 'meantone', 'scala'] as const
export type SystemName = (typeof SYSTEM_NAMES)[number]

export const A4_MIN = 415
export const A4_MAX = 466

/** Options of a tuning system; each system reads only the ones it needs. */
export const SystemOptions = z.object({
  name: z.enum(SYSTEM_NAMES),
  /** just-root / just-common: the seventh as 7/4 ('harmonic') or 9/5 and 16/9 ('5-limit'). */
  seventh: z.enum(['harmonic', '5-limit']).default('harmonic'),
  /** just-tonic / meantone / scala: the tonic (pitch class such as "Bb"); defaults to the drill's key. */
  tonic: z.string().min(1).optional(),
  /** pythagorean: first note of the chain of fifths (defaults to the tonic). */
  start: z.string().min(1).optional(),
  /** pythagorean: the note whose fifth above is the wolf (defaults to 11 fifths above start). */
  wolf: z.string().min(1).optional(),
  /** meantone: fraction of the syntonic comma each fifth is narrowed by ("1/4", "1/6", 0.25). */
  fraction: z.union([z.string().regex(/^\s*\d+\s*\/\s*\d+\s*$/, 'a fraction such as 1/4'), z.number().positive().max(1)]).default('1/4'),
  /** scala: the .scl file's text. */
  scala: z.string().optional(),
})
export type SystemOptions = z.infer<typeof SystemOptions>

export const DrillPart = z.object({
  name: z.string().trim().min(1).max(60),
  /** Instrument id from shared/tuning/transpose.ts (e.g. 'voice-soprano', 'trumpet-bb'); concert pitch when absent. */
  instrument: z.string().min(1).optional(),
})

export const DrillChord = z.object({
  /** Length in beats (the tempo's beat). */
  beats: z.number().positive().max(64),
  /** Optional chord symbol ("C", "Am7", "G7/B"); settles ambiguous sets. */
  symbol: z.string().trim().min(1).max(20).optional(),
  /** Concert-pitch note with octave per part name ("Bb3", "F#4", "Cx5"), or null for a rest. */
  notes: z.record(z.string(), z.string().min(2).max(6).nullable()),
})

/** A drill document: what a director authors, imports from MIDI, and the analysis aligns to. */
export const DrillDocument = z.object({
  title: z.string().trim().min(1).max(120),
  /** Key as "<tonic> major|minor", e.g. "Eb major". */
  key: z.string().regex(/^[A-Ga-g](#{1,2}|b{1,2}|x)?\s+(major|minor)$/, 'a key such as "Eb major"').default('C major'),
  /** Beats per minute. */
  tempo: z.number().min(20).max(300).default(60),
  /** Reference pitch A4 in Hz. */
  a4: z.number().min(A4_MIN).max(A4_MAX).default(440),
  system: SystemOptions.default({ name: 'equal', seventh: 'harmonic', fraction: '1/4' }),
  /** Tolerance in ± cents. */
  tolerance: z.number().positive().max(50).default(10),
  parts: z.array(DrillPart).min(1).max(16),
  chords: z.array(DrillChord).min(1).max(500),
}).superRefine((drill, ctx) => {
  const names = new Set<string>()
  drill.parts.forEach((p, i) => {
    if (names.has(p.name)) ctx.addIssue({ code: 'custom', path: ['parts', i, 'name'], message: `duplicate part name "${p.name}"` })
    names.add(p.name)
  })
  drill.chords.forEach((c, i) => {
    for (const name of names) {
      if (!(name in c.notes)) ctx.addIssue({ code: 'custom', path: ['chords', i, 'notes', name], message: `chord ${i + 1} has no note or rest for part "${name}"` })
    }
    for (const name of Object.keys(c.notes)) {
      if (!names.has(name)) ctx.addIssue({ code: 'custom', path: ['chords', i, 'notes', name], message: `chord ${i + 1} names unknown part "${name}"` })
    }
  })
})
export type DrillDocument = z.infer<typeof DrillDocument>
export type DrillInput = z.input<typeof DrillDocument>
