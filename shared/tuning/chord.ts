import { Chord, Interval } from '@tonaljs/tonal'
import type { ParsedNote, ParsedPc } from './pitch'
import { mod, parsePitchClass, prettyPc } from './pitch'

/** What a note is in its chord. 'added' = a sounding note the chord symbol does not contain. */
export type ChordMember =
  | 'root' | 'second' | 'third' | 'fourth' | 'fifth' | 'sixth' | 'seventh'
  | 'ninth' | 'eleventh' | 'thirteenth' | 'added'

export interface ChordNoteRole {
  member: ChordMember | null
  /** Simple interval above the root, spelled ("3M", "5d", "7m"), or null when the chord has no name. */
  interval: string | null
}

export interface ChordAnalysis {
  /** Root pitch class, or null when the set cannot be named. */
  root: ParsedPc | null
  /** Our quality name ("major", "minor", "dominant-seventh", "half-diminished-seventh", …). */
  quality: string | null
  /** The name the chord was understood as ("Am7", "C/E"), or null. */
  name: string | null
  /** Spelled intervals of the chord type ("1P 3m 5P 7m"). */
  intervals: string[]
  /** One entry per input note, in input order. */
  roles: ChordNoteRole[]
  /** MIDI number of the root in the octave at or below the lowest note (ratios are taken from it). */
  rootRefMidi: number | null
  warnings: { code: string, message: string }[]
}

const MEMBER_BY_NUMBER: Record<number, ChordMember> = {
  1: 'root', 2: 'second', 3: 'third', 4: 'fourth', 5: 'fifth', 6: 'sixth', 7: 'seventh',
  8: 'root', 9: 'ninth', 11: 'eleventh', 13: 'thirteenth',
}

// Our quality names; chord types not listed use tonal's own type name (kebab-cased) or alias.
const QUALITY_BY_ALIAS: Record<string, string> = {
  'M': 'major', 'm': 'minor', 'dim': 'diminished', 'aug': 'augmented',
  'sus4': 'suspended-fourth', 'sus2': 'suspended-second', '5': 'fifth',
  '7': 'dominant-seventh', 'maj7': 'major-seventh', 'm7': 'minor-seventh',
  'm7b5': 'half-diminished-seventh', 'dim7': 'diminished-seventh', 'm/ma7': 'minor-major-seventh',
  '6': 'major-sixth', 'm6': 'minor-sixth', '7sus4': 'suspended-fourth-seventh',
  '9': 'dominant-ninth', 'maj9': 'major-ninth', 'm9': 'minor-ninth', 'Madd9': 'major-added-ninth',
  'madd9': 'minor-added-ninth', '7no5': 'dominant-seventh',
}

// Detection preference: plain triads and sevenths first, then common extensions, then the rest.
// Within a tier the chord whose root is in the bass wins (so C–E–G–A is C6, A–C–E–G is Am7).
const TIER0 = new Set(['M', 'm', 'dim', 'aug', '7', 'maj7', 'm7', 'm7b5', 'dim7', '6', 'm6', 'sus4', 'sus2', '7sus4', 'm/ma7', '5'])
const TIER1 = new Set(['9', 'maj9', 'm9', 'Madd9', 'madd9', '6add9', 'm69', '7b9', '7#9', '11', 'm11', '13', 'maj13', 'm13', '7no5', '9sus4', '7#5', '7b5', 'maj7#5', '7#11', 'maj#4', '9no5', '7b13'])

function tier(alias: string): number {
  return TIER0.has(alias) ? 0 : TIER1.has(alias) ? 1 : 2
}

function qualityOf(alias: string, typeName: string): string {
  return QUALITY_BY_ALIAS[alias] ?? (typeName ? typeName.replace(/[\s/]+/g, '-') : `chord-${alias}`)
}

const DEFAULT_INTERVAL_BY_SEMITONE = ['1P', '2m', '2M', '3m', '3M', '4P', '4A', '5P', '6m', '6M', '7m', '7M']

/** Simple spelled interval from pitch class `from` up to pitch class `to`, checked against their chromas. */
function simpleInterval(from: ParsedPc, to: { pc: string, chroma: number }): string {
  const semis = mod(to.chroma - from.chroma, 12)
  const spelled = Interval.get(Interval.distance(from.pc, to.pc))
  if (!spelled.empty && mod(spelled.semitones ?? 0, 12) === semis && /^(P|M|m|A|d)$/.test(spelled.q)) {
    return `${(spelled.step ?? 0) + 1}${spelled.q}`
  }
  return DEFAULT_INTERVAL_BY_SEMITONE[semis]!
}

interface ChordType {
  root: ParsedPc
  alias: string
  typeName: string
  intervals: string[]
  name: string
}

/** Reads a chord symbol ("Am7", "G7/B", "F#m7b5", "Bb"); null when it is not one. */
export function parseChordSymbol(symbol: string): ChordType | null {
  const text = symbol.trim().replace(/♭/g, 'b').replace(/♯/g, '#').replace(/[()]/g, '')
  const [main, bass, ...extra] = text.split('/')
  if (!main || extra.length) return null
  if (bass !== undefined) {
    try { parsePitchClass(bass) } catch { return null }
  }
  const c = Chord.get(main)
  if (c.empty || !c.tonic) return null
  let root: ParsedPc
  try { root = parsePitchClass(c.tonic) } catch { return null }
  return { root, alias: c.aliases[0] ?? c.type, typeName: c.type, intervals: c.intervals, name: symbol.trim() }
}

// Chord detection walks every chord type for every rotation; drills repeat the same sets, so remember them.
const DETECTED = new Map<string, ChordType | null>()
const DETECTED_MAX = 5000

function detect(sorted: ParsedNote[]): ChordType | null {
  const pcs: string[] = []
  const chromas = new Set<number>()
  for (const n of sorted) {
    if (!chromas.has(n.chroma)) { chromas.add(n.chroma); pcs.push(n.pc) }
  }
  const key = pcs.join(' ')
  if (DETECTED.has(key)) return DETECTED.get(key)!
  const found = detectPcs(pcs)
  if (DETECTED.size >= DETECTED_MAX) DETECTED.clear()
  DETECTED.set(key, found)
  return found
}

function detectPcs(pcs: string[]): ChordType | null {
  if (pcs.length === 1) {
    const root = parsePitchClass(pcs[0]!)
    return { root, alias: '1', typeName: 'unison', intervals: ['1P'], name: pcs[0]! }
  }
  const candidates = Chord.detect(pcs).map((name, order) => {
    const [main, bass] = name.split('/')
    const c = Chord.get(main!)
    if (c.empty || !c.tonic) return null
    const alias = c.aliases[0] ?? c.type
    return { name, order, bassIsRoot: bass === undefined, t: tier(alias), c, alias }
  }).filter(x => x !== null)
  candidates.sort((a, b) => a.t - b.t || Number(b.bassIsRoot) - Number(a.bassIsRoot) || a.order - b.order)
  const best = candidates[0]
  if (best) {
    return { root: parsePitchClass(best.c.tonic!), alias: best.alias, typeName: best.c.type, intervals: best.c.intervals, name: best.name }
  }
  if (pcs.length === 2) return dyad(pcs[0]!, pcs[1]!)
  return null
}

// A bare third or sixth names its chord by the third it implies (E–C is C major without its fifth).
function dyad(lower: string, upper: string): ChordType | null {
  const lo = parsePitchClass(lower)
  const hi = parsePitchClass(upper)
  const iv = simpleInterval(lo, hi)
  const make = (root: ParsedPc, other: ParsedPc, alias: 'M' | 'm'): ChordType => ({
    root, alias, typeName: alias === 'M' ? 'major' : 'minor', intervals: ['1P', alias === 'M' ? '3M' : '3m'],
    name: root.chroma === lo.chroma ? `${root.pc}${alias === 'M' ? '' : 'm'}` : `${root.pc}${alias === 'M' ? '' : 'm'}/${other.pc}`,
  })
  switch (iv) {
    case '3M': return make(lo, hi, 'M')
    case '3m': return make(lo, hi, 'm')
    case '6m': return make(hi, lo, 'M')
    case '6M': return make(hi, lo, 'm')
    case '4P': return { root: hi, alias: '5', typeName: 'fifth', intervals: ['1P', '5P'], name: `${hi.pc}5/${lo.pc}` }
    default: return null
  }
}

/**
 * Finds the root, quality and each note's member from the sounding notes (any voicing, inversion or
 * doubling) and an optional chord symbol; the symbol settles ambiguity, without one the bass does.
 */
export function analyzeChord(notes: ParsedNote[], symbol?: string | null): ChordAnalysis {
  const warnings: ChordAnalysis['warnings'] = []
  const sorted = [...notes].sort((a, b) => a.midi - b.midi)
  let type: ChordType | null = null
  if (symbol) {
    type = parseChordSymbol(symbol)
    if (!type) warnings.push({ code: 'unknown_symbol', message: `"${symbol}" is not a chord symbol we read; the chord is named from its notes` })
  }
  if (!type && sorted.length) type = detect(sorted)
  if (!type) {
    if (sorted.length) {
      warnings.push({
        code: 'unnamed_chord',
        message: `${sorted.map(n => prettyPc(n.pc)).filter((p, i, a) => a.indexOf(p) === i).join('–')} cannot be named as a chord`,
      })
    }
    return { root: null, quality: null, name: null, intervals: [], roles: notes.map(() => ({ member: null, interval: null })), rootRefMidi: null, warnings }
  }
  const root = type.root
  const memberChroma = type.intervals.map(iv => {
    const i = Interval.get(iv)
    return { iv: `${(i.step ?? 0) + 1}${i.q}`, num: Math.abs(i.num ?? 0), chroma: mod(i.semitones ?? 0, 12) }
  })
  const added = new Set<string>()
  const roles = notes.map((n): ChordNoteRole => {
    const semis = mod(n.chroma - root.chroma, 12)
    const m = memberChroma.find(x => x.chroma === semis)
    if (m) return { member: MEMBER_BY_NUMBER[m.num] ?? 'added', interval: m.iv }
    added.add(prettyPc(n.pc))
    return { member: 'added', interval: simpleInterval(root, n) }
  })
  if (added.size) {
    warnings.push({ code: 'symbol_mismatch', message: `${[...added].join(', ')} ${added.size === 1 ? 'is' : 'are'} not in ${type.name}; tuned as added tones above ${prettyPc(root.pc)}` })
  }
  const bass = sorted[0]
  const rootRefMidi = bass ? bass.midi - mod(bass.chroma - root.chroma, 12) : null
  return {
    root,
    quality: type.alias === '1' ? 'unison' : qualityOf(type.alias, type.typeName),
    name: type.name,
    intervals: type.intervals,
    roles,
    rootRefMidi,
    warnings,
  }
}
