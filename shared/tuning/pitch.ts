import { Note } from '@tonaljs/tonal'
import { TuningError } from './errors'
import { describeValue } from '../text'

/** Reference pitch limits (A4 in Hz) the product supports, from Baroque 415 to high 466. */
export const A4_MIN = 415
export const A4_MAX = 466

/** A note name with octave, parsed. `fifths` is the note's place on the line of fifths (C = 0, G = 1, F = −1). */
export interface ParsedNote {
  name: string
  pc: string
  letter: string
  alt: number
  oct: number
  midi: number
  chroma: number
  fifths: number
}

/** Accepts the Unicode accidentals people paste from scores (♭ ♯ 𝄪 𝄫 ♮) as well as b, #, x. */
function normalise(name: string): string {
  return name.trim()
    .replace(/𝄫/g, 'bb').replace(/𝄪/g, 'x').replace(/♭/g, 'b').replace(/♯/g, '#').replace(/♮/g, '')
}

const LETTER_FIFTHS: Record<string, number> = { F: -1, C: 0, G: 1, D: 2, A: 3, E: 4, B: 5 }

function describe(name: unknown): string {
  return describeValue(name)
}

/** Parses a note with octave ("Bb3", "F#4", "Cx5", "Ebb2", "B♭3"); throws TuningError('unknown_note'). */
export function parseNote(name: string, path: string | null = null): ParsedNote {
  if (typeof name !== 'string' || !name.trim()) {
    throw new TuningError('unknown_note', `${describe(name)} is not a note name such as Bb3`, path)
  }
  const n = Note.get(normalise(name))
  // Lower-case "b" as a letter is ambiguous only in theory: tonal reads "bb3" as B♭3, which is what people mean.
  if (n.empty || n.oct === undefined || n.oct === null) {
    throw new TuningError('unknown_note', `${describe(name)} is not a note name with octave such as Bb3 or F#4`, path)
  }
  if (Math.abs(n.alt) > 2) {
    throw new TuningError('unknown_note', `${describe(name)} has more than two accidentals`, path)
  }
  if (n.midi === null || n.midi < 0 || n.midi > 127) {
    throw new TuningError('unknown_note', `${describe(name)} is outside the MIDI range C-1 to G9`, path)
  }
  return {
    name: n.name,
    pc: n.pc,
    letter: n.letter,
    alt: n.alt,
    oct: n.oct,
    midi: n.midi,
    chroma: n.chroma,
    fifths: LETTER_FIFTHS[n.letter]! + 7 * n.alt,
  }
}

/** A pitch class without octave ("Eb", "F#"). */
export interface ParsedPc {
  pc: string
  chroma: number
  fifths: number
}

/** Parses a pitch class such as "Eb" or "F#" (no octave); throws TuningError('unknown_note'). */
export function parsePitchClass(name: string, path: string | null = null): ParsedPc {
  if (typeof name !== 'string' || !name.trim()) {
    throw new TuningError('unknown_note', `${describe(name)} is not a note name such as Eb`, path)
  }
  const n = Note.get(normalise(name))
  if (n.empty || (n.oct !== undefined && n.oct !== null) || Math.abs(n.alt) > 2) {
    throw new TuningError('unknown_note', `${describe(name)} is not a note name without octave such as Eb or F#`, path)
  }
  return { pc: n.pc, chroma: n.chroma, fifths: LETTER_FIFTHS[n.letter]! + 7 * n.alt }
}

/** MIDI note number of a note name (C4 = 60, A4 = 69). */
export function noteToMidi(name: string): number {
  return parseNote(name).midi
}

/** Throws TuningError('a4_out_of_range') unless a4 is a number from 415 to 466 Hz. */
export function checkA4(a4: number, path: string | null = 'a4'): number {
  if (typeof a4 !== 'number' || !Number.isFinite(a4) || a4 < A4_MIN || a4 > A4_MAX) {
    throw new TuningError('a4_out_of_range', `The reference pitch A4 must be from ${A4_MIN} to ${A4_MAX} Hz (got ${String(a4)})`, path)
  }
  return a4
}

/** Frequency of a (possibly fractional) MIDI note: f = a4·2^((n−69)/12). */
export function midiToHz(midi: number, a4 = 440): number {
  checkA4(a4)
  if (typeof midi !== 'number' || !Number.isFinite(midi)) {
    throw new TuningError('bad_number', `${String(midi)} is not a MIDI note number`)
  }
  return a4 * 2 ** ((midi - 69) / 12)
}

/** Fractional MIDI note of a frequency: n = 69 + 12·log2(f/a4). */
export function hzToMidi(hz: number, a4 = 440): number {
  checkA4(a4)
  if (typeof hz !== 'number' || !Number.isFinite(hz) || hz <= 0) {
    throw new TuningError('bad_number', `${String(hz)} is not a positive frequency`)
  }
  return 69 + 12 * Math.log2(hz / a4)
}

/** Interval from f1 up to f2 in cents: 1200·log2(f2/f1). */
export function centsBetween(f1: number, f2: number): number {
  for (const f of [f1, f2]) {
    if (typeof f !== 'number' || !Number.isFinite(f) || f <= 0) {
      throw new TuningError('bad_number', `${String(f)} is not a positive frequency`)
    }
  }
  return 1200 * Math.log2(f2 / f1)
}

/** Equal-tempered frequency of a note name at the reference pitch. */
export function equalHz(noteName: string, a4 = 440): number {
  return midiToHz(parseNote(noteName).midi, a4)
}

/** A key such as "Eb major" or "c minor". */
export interface ParsedKey {
  tonic: ParsedPc
  mode: 'major' | 'minor'
  name: string
}

/** Parses "<tonic> major|minor"; throws TuningError('bad_key'). */
export function parseKey(key: string, path: string | null = 'key'): ParsedKey {
  const m = typeof key === 'string' ? /^\s*(\S+)\s+(major|minor)\s*$/i.exec(key) : null
  if (!m) throw new TuningError('bad_key', `${describe(key)} is not a key such as "Eb major" or "G minor"`, path)
  const tonic = parsePitchClass(m[1]!, path)
  const mode = m[2]!.toLowerCase() as 'major' | 'minor'
  return { tonic, mode, name: `${tonic.pc} ${mode}` }
}

/** Pitch-class name for display: ASCII b/# to ♭/♯ ("Bb" → "B♭"). */
export function prettyPc(pc: string): string {
  return pc.replace(/##/g, '𝄪').replace(/#/g, '♯').replace(/b/g, '♭')
}

export const mod = (n: number, m: number): number => ((n % m) + m) % m
