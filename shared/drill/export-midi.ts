// Writes a drill as a Standard MIDI File; importing it gives back the same drill (MIDI carries no
// spelling: notes are re-spelled in the drill's key).
import pkg from '@tonejs/midi'
import { parseNote } from '../tuning/pitch'
import type { DrillDocument } from './schema'
import { keyFifths, partEvents, settingsOf } from './export-musicxml'

// @tonejs/midi is CommonJS: the named import fails in the built server.
const { Midi } = pkg

/** Meta text carrying the settings a Standard MIDI File has no event for. */
export const MIDI_SETTINGS_PREFIX = 'driftline-settings '
/** Meta text carrying a chord symbol at the chord's first tick. */
export const MIDI_CHORD_PREFIX = 'driftline-chord '

/**
 * The drill as a Standard MIDI File (format 1): a track per part named after it, common tones
 * held, the tempo, the key signature and a 4/4 time signature; A4, tolerance, tuning system and
 * each part's instrument travel in a text event.
 */
export function drillToMidi(doc: DrillDocument): Uint8Array {
  const midi = new Midi()
  midi.header.setTempo(doc.tempo)
  midi.header.name = doc.title
  midi.header.timeSignatures.push({ ticks: 0, timeSignature: [4, 4] })
  const { fifths, mode } = keyFifths(doc.key)
  // Placeholder key; its sf byte is written below (see fixKeySignature).
  midi.header.keySignatures.push({ ticks: 0, key: 'C', scale: mode })
  const instruments = Object.fromEntries(doc.parts.filter(p => p.instrument).map(p => [p.name, p.instrument!]))
  midi.header.meta.push({ ticks: 0, type: 'text', text: `${MIDI_SETTINGS_PREFIX}${JSON.stringify({ ...settingsOf(doc), instruments })}` })
  // ppq is read-only in @tonejs/midi; its default is 480 ticks per quarter note.
  const ppq = midi.header.ppq
  let t = 0
  for (const c of doc.chords) {
    if (c.symbol) midi.header.meta.push({ ticks: Math.round(t * ppq), type: 'text', text: `${MIDI_CHORD_PREFIX}${c.symbol}` })
    t += c.beats
  }
  doc.parts.forEach((p, pi) => {
    const track = midi.addTrack()
    track.name = p.name
    track.channel = pi % 16 === 9 ? 10 : pi % 16 // channel 10 (index 9) is for drums in General MIDI
    for (const ev of partEvents(doc, p.name)) {
      if (!ev.note) continue
      track.addNote({ midi: parseNote(ev.note).midi, ticks: Math.round(ev.start * ppq), durationTicks: Math.round(ev.beats * ppq), velocity: 0.8 })
    }
  })
  return fixKeySignature(new Uint8Array(midi.toArray()), fifths)
}

/**
 * Writes the key signature's sf byte (sharps positive, flats negative, −7 … 7; SMF 1.0 meta event
 * FF 59 02 sf mi). @tonejs/midi 2.0.28 writes its key-name index plus 7 there, which no reader
 * understands, so the byte is set here after encoding.
 */
function fixKeySignature(bytes: Uint8Array, fifths: number): Uint8Array {
  for (let i = 0; i + 4 < bytes.length; i++) {
    if (bytes[i] === 0xff && bytes[i + 1] === 0x59 && bytes[i + 2] === 0x02) {
      bytes[i + 3] = fifths & 0xff
      break
    }
  }
  return bytes
}
