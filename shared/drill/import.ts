// One entry for every drill file: a drill document (JSON), a Standard MIDI File, a MusicXML score
// or a compressed MusicXML file (.mxl). Used by the import route and the command line.
import { jsonErrorPlace } from '../text'
import { TuningError } from '../tuning/errors'
import { midiToDrill } from './midi'
import { musicXmlToDrill, parseBars, readMxl, type BarRange } from './musicxml'
import { parseDrill, type DrillDocument } from './schema'

export type DrillFileFormat = 'json' | 'midi' | 'musicxml' | 'mxl'

export interface DrillFileOptions {
  /** The uploaded file's name (the title when none is given, and a hint to the format). */
  fileName?: string
  /** Replaces the file's own title. */
  title?: string
  /** Bars to keep: "3-6" or a range. */
  bars?: string | BarRange
  /** Key for a MIDI file ("Eb major"); MIDI files often carry none. */
  key?: string
  /** Read a file of no known format as a drill document (so its JSON error is reported). */
  textAsJson?: boolean
}

export interface DrillFileResult {
  format: DrillFileFormat
  drill: DrillDocument
  /** What the import did that a person should know (crossing voices, divided parts), with the bar. */
  warnings: string[]
}

/** The format of a drill file from its first bytes (and its name when the bytes do not say). */
export function detectDrillFormat(bytes: Uint8Array, fileName?: string): DrillFileFormat | null {
  if (bytes.length >= 4 && bytes[0] === 0x4d && bytes[1] === 0x54 && bytes[2] === 0x68 && bytes[3] === 0x64) return 'midi' // "MThd"
  if (bytes.length >= 4 && bytes[0] === 0x50 && bytes[1] === 0x4b && bytes[2] === 0x03 && bytes[3] === 0x04) return 'mxl' // zip
  const head = new TextDecoder('utf-8', { fatal: false }).decode(bytes.subarray(0, 512)).replace(/^\uFEFF/, '').trimStart()
  if (head.startsWith('{')) return 'json'
  if (head.startsWith('<')) return 'musicxml'
  const ext = /\.([a-z]+)$/i.exec(fileName ?? '')?.[1]?.toLowerCase()
  if (ext === 'musicxml' || ext === 'xml') return 'musicxml'
  if (ext === 'mxl') return 'mxl'
  return null
}

/**
 * Reads any drill file into a validated drill. Throws TuningError with a stable code and a
 * message naming the bar, track or field; code 'unknown_format' for a file of no format we read.
 */
export function readDrillFile(bytes: Uint8Array, opts: DrillFileOptions = {}): DrillFileResult {
  const format = detectDrillFormat(bytes, opts.fileName) ?? (opts.textAsJson ? 'json' : null)
  const bars = typeof opts.bars === 'string' ? parseBars(opts.bars) : opts.bars
  const warnings: string[] = []
  const title = opts.title?.trim() || undefined
  switch (format) {
    case 'midi':
      return { format, drill: midiToDrill(bytes, { title, fileName: opts.fileName, bars, key: opts.key, warnings }), warnings }
    case 'mxl':
    case 'musicxml': {
      const text = format === 'mxl' ? readMxl(bytes) : decodeText(bytes)
      return { format, drill: musicXmlToDrill(text, { title, fileName: opts.fileName, bars, warnings }), warnings }
    }
    case 'json': {
      let json: Record<string, unknown>
      const text = decodeText(bytes)
      try {
        json = JSON.parse(text) as Record<string, unknown>
      } catch {
        // The parser's own wording varies by engine; say where instead.
        const place = jsonErrorPlace(text)
        throw new TuningError('invalid_json', `The drill file is not valid JSON${place ? ` (${place})` : ''}`)
      }
      if (bars) warnings.push('A bar range applies to MusicXML and MIDI files; the drill document was imported whole')
      const drill = parseDrill(json && typeof json === 'object' && title ? { ...json, title } : json)
      return { format, drill: opts.key ? parseDrill({ ...drill, key: opts.key }) : drill, warnings }
    }
    default:
      throw new TuningError('unknown_format', 'This file is not a drill file we read: choose MusicXML (.musicxml, .xml, .mxl), a Standard MIDI File (.mid) or a drill document (.json)')
  }
}

function decodeText(bytes: Uint8Array): string {
  // A UTF-16 file starts with its byte-order mark; everything else is read as UTF-8.
  if (bytes[0] === 0xff && bytes[1] === 0xfe) return new TextDecoder('utf-16le').decode(bytes)
  if (bytes[0] === 0xfe && bytes[1] === 0xff) return new TextDecoder('utf-16be').decode(bytes)
  return new TextDecoder('utf-8', { fatal: false }).decode(bytes).replace(/^\uFEFF/, '')
}

/**
 * Renames imported parts (to the ensemble's section names): `names` maps an imported part name
 * to its new name. Throws TuningError('invalid_part_names') naming the clash.
 */
export function renameParts(drill: DrillDocument, names: Record<string, string>): DrillDocument {
  const rename = (n: string) => (Object.hasOwn(names, n) && names[n]!.trim() ? names[n]!.trim() : n)
  for (const from of Object.keys(names)) {
    if (!drill.parts.some(p => p.name === from)) throw new TuningError('invalid_part_names', `The drill has no part "${from}" to rename`, 'parts')
  }
  const seen = new Set<string>()
  for (const p of drill.parts) {
    const to = rename(p.name)
    if (to.length > 60) throw new TuningError('invalid_part_names', `The part name "${to.slice(0, 20)}…" is longer than 60 characters`, 'parts')
    if (seen.has(to)) throw new TuningError('invalid_part_names', `Two parts would both be named "${to}"; give each part its own name`, 'parts')
    seen.add(to)
  }
  return parseDrill({
    ...drill,
    parts: drill.parts.map(p => ({ ...p, name: rename(p.name) })),
    chords: drill.chords.map(c => ({ ...c, notes: Object.fromEntries(Object.entries(c.notes).map(([k, v]) => [rename(k), v])) })),
  })
}
