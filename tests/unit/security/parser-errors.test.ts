// Importers answer bad files with a stable code and a plain message: never the JavaScript wording
// of a reader that tripped ("Cannot read properties of undefined", "undefined", "[object Object]").
import { describe, expect, it } from 'vitest'
import { midiToDrill } from '../../../shared/drill/midi'
import { parseDrill } from '../../../shared/drill/schema'
import { parseNote, parsePitchClass } from '../../../shared/tuning/pitch'
import { parseScala } from '../../../shared/tuning/scala'
import { TuningError } from '../../../shared/tuning/errors'
import { DrillNoteError } from '../../../server/utils/drills'

const INTERNAL = /undefined|\[object Object\]|Cannot read|is not a function|Unexpected token|received|SyntaxError|TypeError/

function caught (fn: () => unknown): TuningError {
  try { fn() } catch (e) { return e as TuningError }
  throw new Error('expected an error')
}

// A Standard MIDI File header chunk: "MThd", length 6, format 1, two tracks, 480 ticks per
// quarter note (Standard MIDI File 1.0 specification, "Header Chunks"; common practice).
const HEADER = [0x4d, 0x54, 0x68, 0x64, 0, 0, 0, 6, 0, 1, 0, 2, 0x01, 0xe0]

describe('MIDI import of damaged files', () => {
  it.each([
    ['a header promising tracks that are not there', HEADER],
    ['bytes that are no track chunk', [...HEADER, 1, 2, 3, 4, 5, 6, 7, 8, 9]],
  ])('%s', (_, bytes) => {
    const e = caught(() => midiToDrill(new Uint8Array(bytes)))
    expect(e).toBeInstanceOf(TuningError)
    expect(e.code).toBe('midi_unreadable')
    expect(e.message).toBe('The MIDI file cannot be read: it is damaged or cut short')
  })
})

describe('drill documents with values of the wrong kind', () => {
  it.each([
    ['a note given as an object', { title: 'T', parts: [{ name: 'Alto' }], chords: [{ beats: 2, notes: { Alto: { pitch: 'C4' } } }] }],
    ['beats missing', { title: 'T', parts: [{ name: 'Alto' }], chords: [{ notes: { Alto: 'C4' } }] }],
    ['parts as text', { title: 'T', parts: 'Alto', chords: [] }],
    ['a title as a list', { title: ['T'], parts: [{ name: 'Alto' }], chords: [{ beats: 1, notes: { Alto: 'C4' } }] }],
  ])('%s', (_, doc) => {
    const e = caught(() => parseDrill(doc))
    expect(e.code).toBe('invalid_drill')
    expect(e.message).not.toMatch(INTERNAL)
    for (const issue of e.issues) expect(issue.message).not.toMatch(INTERNAL)
  })

  it('names a broken JSON text by line and column', () => {
    const e = caught(() => parseDrill('{\n  "title": "Warm-up",\n  "parts": [\n'))
    expect(e.code).toBe('invalid_json')
    expect(e.message).toBe('The drill document is not valid JSON (line 4, column 1)')
  })
})

describe('note names of the wrong kind', () => {
  it.each([[{ name: 'C4' }], [['C4']], [42], [null]])('%j', (value) => {
    expect(caught(() => parseNote(value as never)).message).not.toMatch(INTERNAL)
    expect(caught(() => parsePitchClass(value as never)).message).not.toMatch(INTERNAL)
    expect(new DrillNoteError(['chords', 0], value as never).message).not.toMatch(INTERNAL)
  })
})

describe('Scala files', () => {
  it.each([[''], ['desc\nseven\n'], ['desc\n2\n100.0\n'], ['desc\n1\n3/0\n'], [{}]])('%j', (text) => {
    const e = caught(() => parseScala(text as never))
    expect(e.code).toBe('bad_scala')
    expect(e.message).not.toMatch(INTERNAL)
  })
})
