import pkg from '@tonejs/midi'
import { Key } from '@tonaljs/tonal'
import { TuningError } from '../tuning/errors'
import { plainIssueMessage } from '../text'
import { mod, parseKey } from '../tuning/pitch'
import type { DrillDocument, DrillInput } from './schema'
import { DrillDocument as DrillSchema, SystemOptions } from './schema'
import { MIDI_CHORD_PREFIX, MIDI_SETTINGS_PREFIX } from './export-midi'

// @tonejs/midi is CommonJS: the named import fails in the built server.
const { Midi } = pkg

export interface MidiImportOptions {
  /** Replaces every other title. */
  title?: string
  /** The uploaded file's name: the title when no `title` is given (before the file's own sequence name). */
  fileName?: string
  /** Bars to keep (1 = the first bar, inclusive). */
  bars?: { from: number, to: number }
  /** Key as "Eb major"; defaults to the file's first key signature, else C major. */
  key?: string
  a4?: number
  system?: SystemOptions
  tolerance?: number
  /** Instrument id per part name (track name). */
  instruments?: Record<string, string>
  /** Notes about the import a person should know (tempo changes, skipped drum tracks) are pushed here. */
  warnings?: string[]
}

const MAJOR_BY_FIFTHS = ['Cb', 'Gb', 'Db', 'Ab', 'Eb', 'Bb', 'F', 'C', 'G', 'D', 'A', 'E', 'B', 'F#', 'C#']
const MINOR_BY_FIFTHS = ['Ab', 'Eb', 'Bb', 'F', 'C', 'G', 'D', 'A', 'E', 'B', 'F#', 'C#', 'G#', 'D#', 'A#']
const SEMI: Record<string, number> = { C: 0, D: 2, E: 4, F: 5, G: 7, A: 9, B: 11 }
const NEUTRAL = ['C', 'C#', 'D', 'Eb', 'E', 'F', 'F#', 'G', 'Ab', 'A', 'Bb', 'B']
const SHARPS = ['C', 'C#', 'D', 'D#', 'E', 'F', 'F#', 'G', 'G#', 'A', 'A#', 'B']
const FLATS = ['C', 'Db', 'D', 'Eb', 'E', 'F', 'Gb', 'G', 'Ab', 'A', 'Bb', 'B']

/** Spells MIDI numbers in a key: the key's own scale (with the minor's raised sixth and seventh) first. */
function speller(key: string): (midi: number) => string {
  const k = parseKey(key)
  const byChroma: (string | undefined)[] = new Array(12)
  let alteration = 0
  if (k.mode === 'major') {
    const mk = Key.majorKey(k.tonic.pc)
    alteration = mk.alteration
    for (const pc of mk.scale) byChroma[chromaOf(pc)] ??= pc
  } else {
    const mk = Key.minorKey(k.tonic.pc)
    alteration = mk.alteration
    for (const pc of [...mk.natural.scale, ...mk.harmonic.scale, ...mk.melodic.scale]) byChroma[chromaOf(pc)] ??= pc
  }
  const fallback = alteration < 0 ? FLATS : alteration > 0 ? SHARPS : NEUTRAL
  return (midi: number) => {
    const pc = byChroma[mod(midi, 12)] ?? fallback[mod(midi, 12)]!
    const base = SEMI[pc[0]!]! + (pc.slice(1).startsWith('b') ? -(pc.length - 1) : pc.length - 1)
    return `${pc}${(midi - base) / 12 - 1}`
  }
}

function chromaOf(pc: string): number {
  return mod(SEMI[pc[0]!]! + (pc.slice(1).startsWith('b') ? -(pc.length - 1) : pc.length - 1), 12)
}

interface PartNote { midi: number, start: number, end: number }

/** A file name without folders and its MIDI extension, underscores read as spaces. */
export function titleFromFileName(name: string | null | undefined): string {
  const base = String(name ?? '').split(/[\\/]/).pop() ?? ''
  return base.replace(/\.(midi?|smf|kar)$/i, '').replace(/_+/g, ' ').replace(/\s+/g, ' ').trim()
}

/**
 * The drill's title: the typed title, else the file's name, else the file's sequence name (the
 * name of its first track when that track is not one of the parts: a track named "Tenor" names a
 * part, not the piece), else a plain default.
 */
function importTitle(opts: MidiImportOptions, sequenceName: string | undefined, partNames: string[]): string {
  const sequence = (sequenceName ?? '').trim()
  const candidates = [
    opts.title ?? '',
    titleFromFileName(opts.fileName),
    partNames.includes(sequence) ? '' : sequence,
  ]
  for (const c of candidates) {
    const t = c.trim().slice(0, 120).trim()
    if (t) return t
  }
  return 'Imported from MIDI'
}

/**
 * Builds a drill from a Standard MIDI File: one part per track with notes (named after the track),
 * a chord for every time span in which the sounding set does not change (a re-struck note starts a
 * new chord), beats in quarter notes, the tempo from the file's first tempo event (120 when none).
 * Errors name the track and bar: no tracks with notes, overlapping notes within one part.
 */
export function midiToDrill(bytes: Uint8Array, opts: MidiImportOptions = {}): DrillDocument {
  if (!(bytes instanceof Uint8Array) || bytes.length < 14 || String.fromCharCode(...bytes.subarray(0, 4)) !== 'MThd') {
    throw new TuningError('midi_unreadable', 'This is not a Standard MIDI File (it does not start with an MThd header)')
  }
  const declaredTracks = (bytes[10]! << 8) | bytes[11]!
  if (declaredTracks === 0) throw new TuningError('midi_no_tracks', 'The MIDI file has no tracks')
  let midi: InstanceType<typeof Midi>
  try {
    midi = new Midi(bytes)
  } catch {
    // The reader's own wording (a JavaScript error) means nothing to people.
    throw new TuningError('midi_unreadable', 'The MIDI file cannot be read: it is damaged or cut short')
  }
  const ppq = midi.header.ppq
  if (!(ppq > 0)) throw new TuningError('midi_unreadable', 'The MIDI file uses SMPTE time, which a drill cannot follow; export it with ticks per quarter note')
  const bar = (ticks: number) => Math.floor(midi.header.ticksToMeasures(ticks) + 1e-9) + 1

  const fileKey = midi.header.keySignatures[0]
  let key = opts.key ?? 'C major'
  if (!opts.key && fileKey) {
    // The key-signature event stores sharps/flats and a minor flag; @tonejs/midi names the major key of
    // that signature, so a minor key's tonic is the relative minor (three fifths lower).
    const fifths = MAJOR_BY_FIFTHS.indexOf(fileKey.key) - 7
    const tonic = fileKey.scale === 'minor' ? MINOR_BY_FIFTHS[fifths + 7] : fileKey.key
    const candidate = `${tonic} ${fileKey.scale === 'minor' ? 'minor' : 'major'}`
    try {
      parseKey(candidate)
      key = candidate
    } catch {
      // Some writers store the key-signature byte out of range; spell in C rather than refuse the file.
      opts.warnings?.push('The file\'s key signature cannot be read; the drill is spelled in C major')
    }
  }
  const spell = speller(key)

  // The bar range as ticks: bar n starts where n − 1 whole bars have passed.
  let windowStart = 0
  let windowEnd = Number.POSITIVE_INFINITY
  if (opts.bars) {
    windowStart = barStartTicks(midi, opts.bars.from - 1)
    windowEnd = barStartTicks(midi, opts.bars.to)
  }
  const where = opts.bars ? ` in bars ${opts.bars.from}–${opts.bars.to}` : ''

  const parts: { name: string, notes: PartNote[] }[] = []
  const used = new Set<string>()
  midi.tracks.forEach((track, ti) => {
    if (!track.notes.length) return
    if (track.instrument.percussion) {
      opts.warnings?.push(`Track ${ti + 1} "${track.name}" is a drum track and was left out`)
      return
    }
    let name = (track.name || '').trim().slice(0, 60) || `Track ${ti + 1}`
    for (let n = 2; used.has(name); n++) name = `${(track.name || `Track ${ti + 1}`).trim().slice(0, 54)} (${n})`
    used.add(name)
    const label = `Track ${ti + 1} "${name}"`
    const notes = track.notes
      .filter(n => n.durationTicks > 0)
      .map(n => ({ midi: n.midi, start: Math.max(n.ticks, windowStart), end: Math.min(n.ticks + n.durationTicks, windowEnd) }))
      .filter(n => n.end > n.start)
      .sort((a, b) => a.start - b.start || a.midi - b.midi)
    // Notation programs sometimes let a legato note overlap the next by a few ticks; trim those.
    const legato = ppq / 32
    for (let i = 1; i < notes.length; i++) {
      const a = notes[i - 1]!
      const b = notes[i]!
      if (b.start < a.end) {
        if (b.start > a.start && a.end - b.start <= legato) { a.end = b.start; continue }
        throw new TuningError('midi_overlap',
          `${label} has overlapping notes in bar ${bar(b.start)} (${spell(a.midi)} and ${spell(b.midi)} sound together); a part plays one note at a time, so put each voice on its own track`,
          `track ${ti + 1}, bar ${bar(b.start)}`)
      }
    }
    if (notes.length) parts.push({ name, notes })
  })
  if (!parts.length) {
    if (opts.bars && midi.tracks.some(t => t.notes.length)) throw new TuningError('midi_no_notes', `The MIDI file has no notes${where}`, 'bars')
    throw new TuningError('midi_no_tracks', 'The MIDI file has no tracks with notes (no note events), so there is nothing to tune')
  }
  if (parts.length > 16) throw new TuningError('midi_too_many_parts', `The MIDI file has ${parts.length} tracks with notes; a drill has at most 16 parts`)

  const times = new Set<number>()
  for (const p of parts) for (const n of p.notes) { times.add(n.start); times.add(n.end) }
  if (!times.has(windowStart)) times.add(windowStart)
  const edges = [...times].sort((a, b) => a - b)
  const cursor = parts.map(() => 0)
  type Segment = { start: number, end: number, sounding: (PartNote | null)[] }
  const segments: Segment[] = []
  for (let i = 0; i + 1 < edges.length; i++) {
    const start = edges[i]!
    const end = edges[i + 1]!
    const sounding = parts.map((p, pi) => {
      while (cursor[pi]! < p.notes.length && p.notes[cursor[pi]!]!.end <= start) cursor[pi]!++
      const n = p.notes[cursor[pi]!]
      return n && n.start <= start && start < n.end ? n : null
    })
    const last = segments[segments.length - 1]
    if (last && last.sounding.every((n, pi) => n === sounding[pi])) last.end = end
    else segments.push({ start, end, sounding })
  }
  if (segments.length > 500) throw new TuningError('midi_too_long', `The MIDI file makes ${segments.length} chords; a drill has at most 500`)

  const chords = segments.map(s => {
    const beats = Math.round(((s.end - s.start) / ppq) * 1e6) / 1e6
    if (beats > 64) throw new TuningError('midi_too_long', `Bar ${bar(s.start)}: a chord or rest lasts ${beats} beats; a drill chord lasts at most 64`, `bar ${bar(s.start)}`)
    const symbol = midi.header.meta.find(m => m.type === 'text' && m.ticks === s.start && m.text.startsWith(MIDI_CHORD_PREFIX))?.text.slice(MIDI_CHORD_PREFIX.length).trim().slice(0, 20)
    return { beats, ...(symbol ? { symbol } : {}), notes: Object.fromEntries(parts.map((p, pi) => [p.name, s.sounding[pi] ? spell(s.sounding[pi]!.midi) : null])) }
  })

  const tempos = midi.header.tempos
  const tempo = Math.round((tempos[0]?.bpm ?? 120) * 1000) / 1000
  if (tempos.length > 1 && tempos.some(t => Math.abs(t.bpm - tempos[0]!.bpm) > 0.01)) {
    opts.warnings?.push(`The file changes tempo; the drill uses its first tempo, ${tempo} beats per minute`)
  }
  if (tempo < 20 || tempo > 300) {
    throw new TuningError('midi_tempo', `The file's tempo is ${tempo} beats per minute; a drill's tempo is from 20 to 300`)
  }

  const settings = readSettings(midi.header.meta)
  const input: DrillInput = {
    title: importTitle(opts, midi.header.name, parts.map(p => p.name)),
    key,
    tempo,
    ...(settings.a4 !== undefined ? { a4: settings.a4 } : {}),
    ...(settings.system ? { system: settings.system } : {}),
    ...(settings.tolerance !== undefined ? { tolerance: settings.tolerance } : {}),
    ...(opts.a4 !== undefined ? { a4: opts.a4 } : {}),
    ...(opts.system ? { system: opts.system } : {}),
    ...(opts.tolerance !== undefined ? { tolerance: opts.tolerance } : {}),
    parts: parts.map((p) => {
      const instrument = opts.instruments?.[p.name] ?? settings.instruments[p.name]
      return { name: p.name, ...(instrument ? { instrument } : {}) }
    }),
    chords,
  }
  const result = DrillSchema.safeParse(input, { error: plainIssueMessage })
  if (!result.success) {
    const issue = result.error.issues[0]!
    const path = issue.path.map(String).join('.')
    throw new TuningError('invalid_drill', `The imported drill is not valid: ${path}: ${issue.message}`, path)
  }
  return result.data
}

/** Ticks at which bar `index` (0 = the first) starts, from the file's time signatures (4/4 when none). */
function barStartTicks(midi: InstanceType<typeof Midi>, index: number): number {
  const ppq = midi.header.ppq
  const sigs = midi.header.timeSignatures as { ticks: number, timeSignature: number[], measures?: number }[]
  const sig = [...sigs].reverse().find(t => (t.measures ?? 0) <= index)
  if (!sig) return index * 4 * ppq
  const [num = 4, den = 4] = sig.timeSignature
  return sig.ticks + (index - (sig.measures ?? 0)) * ppq * 4 * num / den
}

/** A4, tolerance, system and instruments as our own export writes them in a text event (ignored when unreadable). */
function readSettings(meta: { type: string, text: string }[]): { a4?: number, tolerance?: number, system?: SystemOptions, instruments: Record<string, string> } {
  const event = meta.find(m => m.type === 'text' && m.text.startsWith(MIDI_SETTINGS_PREFIX))
  if (!event) return { instruments: {} }
  try {
    const v = JSON.parse(event.text.slice(MIDI_SETTINGS_PREFIX.length)) as Record<string, unknown>
    const system = SystemOptions.safeParse(v.system)
    const instruments = v.instruments && typeof v.instruments === 'object' ? v.instruments as Record<string, unknown> : {}
    return {
      ...(typeof v.a4 === 'number' ? { a4: v.a4 } : {}),
      ...(typeof v.tolerance === 'number' ? { tolerance: v.tolerance } : {}),
      ...(system.success ? { system: system.data } : {}),
      instruments: Object.fromEntries(Object.entries(instruments).filter((e): e is [string, string] => typeof e[1] === 'string')),
    }
  } catch {
    return { instruments: {} }
  }
}
