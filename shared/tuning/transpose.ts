import { Interval, Note } from '@tonaljs/tonal'
import { TuningError } from './errors'
import { parseNote } from './pitch'

export type Clef = 'treble' | 'treble-8vb' | 'bass' | 'alto' | 'tenor'

/** A part's instrument: how its music is written relative to concert pitch. */
export interface Instrument {
  id: string
  label: string
  clef: Clef
  /** Spelled interval from concert up to written pitch ("2M": written a major second above sounding). */
  interval: string
  /** Written minus concert, in semitones (+2 for a B♭ instrument). */
  semitones: number
}

type Row = [id: string, label: string, clef: Clef, interval: string]

// Standard transpositions (common practice): a B♭ instrument reads a major second above sounding,
// E♭ alto instruments a major sixth, F horn a perfect fifth, A clarinet a minor third; treble-clef
// baritone/euphonium/tenor sax/bass clarinet a major ninth; E♭ bass and baritone sax an octave and a
// major sixth; B♭ bass two octaves and a major second; piccolo and E♭ soprano cornet sound above
// written; tenor voices read treble clef an octave above sounding.
const ROWS: Row[] = [
  ['concert', 'Concert pitch', 'treble', '1P'],
  ['voice-soprano', 'Soprano voice', 'treble', '1P'],
  ['voice-alto', 'Alto voice', 'treble', '1P'],
  ['voice-tenor', 'Tenor voice (treble clef, an octave lower)', 'treble-8vb', '8P'],
  ['voice-baritone', 'Baritone voice', 'bass', '1P'],
  ['voice-bass', 'Bass voice', 'bass', '1P'],
  ['soprano-cornet-eb', 'Soprano cornet in E♭', 'treble', '-3m'],
  ['cornet-bb', 'Cornet in B♭', 'treble', '2M'],
  ['trumpet-bb', 'Trumpet in B♭', 'treble', '2M'],
  ['trumpet-c', 'Trumpet in C', 'treble', '1P'],
  ['flugelhorn-bb', 'Flugelhorn in B♭', 'treble', '2M'],
  ['horn-f', 'Horn in F', 'treble', '5P'],
  ['tenor-horn-eb', 'Tenor horn in E♭', 'treble', '6M'],
  ['baritone-bb-treble', 'Baritone in B♭ (treble clef)', 'treble', '9M'],
  ['euphonium-bb-treble', 'Euphonium in B♭ (treble clef)', 'treble', '9M'],
  ['euphonium-bass', 'Euphonium (bass clef, concert pitch)', 'bass', '1P'],
  ['trombone', 'Trombone (bass clef, concert pitch)', 'bass', '1P'],
  ['trombone-bb-treble', 'Tenor trombone in B♭ (treble clef)', 'treble', '9M'],
  ['bass-trombone', 'Bass trombone', 'bass', '1P'],
  ['tuba-bass', 'Tuba (bass clef, concert pitch)', 'bass', '1P'],
  ['eb-bass-treble', 'E♭ bass (treble clef)', 'treble', '13M'],
  ['bb-bass-treble', 'B♭ bass (treble clef)', 'treble', '16M'],
  ['piccolo', 'Piccolo', 'treble', '-8P'],
  ['flute', 'Flute', 'treble', '1P'],
  ['oboe', 'Oboe', 'treble', '1P'],
  ['clarinet-eb', 'Clarinet in E♭', 'treble', '-3m'],
  ['clarinet-bb', 'Clarinet in B♭', 'treble', '2M'],
  ['clarinet-a', 'Clarinet in A', 'treble', '3m'],
  ['bass-clarinet-bb', 'Bass clarinet in B♭ (treble clef)', 'treble', '9M'],
  ['bassoon', 'Bassoon', 'bass', '1P'],
  ['soprano-sax-bb', 'Soprano saxophone in B♭', 'treble', '2M'],
  ['alto-sax-eb', 'Alto saxophone in E♭', 'treble', '6M'],
  ['tenor-sax-bb', 'Tenor saxophone in B♭', 'treble', '9M'],
  ['baritone-sax-eb', 'Baritone saxophone in E♭', 'treble', '13M'],
]

/** Every instrument a part can name, by id. */
export const INSTRUMENTS: Readonly<Record<string, Instrument>> = Object.freeze(Object.fromEntries(ROWS.map(([id, label, clef, interval]) => {
  return [id, Object.freeze({ id, label, clef, interval, semitones: Interval.get(interval).semitones ?? 0 })]
})))

/** The instrument with this id; throws TuningError('unknown_instrument'). */
export function getInstrument(id: string, path: string | null = null): Instrument {
  const inst = Object.hasOwn(INSTRUMENTS, id) ? INSTRUMENTS[id] : undefined
  if (!inst) throw new TuningError('unknown_instrument', `"${id}" is not an instrument we know (for example trumpet-bb, horn-f, alto-sax-eb, voice-tenor)`, path)
  return inst
}

function shift(note: string, interval: string): string {
  const out = Note.transpose(note, interval)
  // A spelling beyond double sharps/flats is unreadable for a player: respell by semitones instead.
  const parsed = Note.get(out)
  if (parsed.empty || Math.abs(parsed.alt) > 2) return Note.fromMidi(parsed.midi ?? 0)
  return out
}

/** The note a player of this instrument reads for a concert-pitch note (B♭ trumpet: concert C5 → D5). */
export function writtenNote(concertNote: string, instrumentId: string): string {
  const inst = getInstrument(instrumentId)
  return shift(parseNote(concertNote).name, inst.interval)
}

/** The concert-pitch note that sounds when this instrument plays a written note (horn in F: written G4 → C4). */
export function concertNote(written: string, instrumentId: string): string {
  const inst = getInstrument(instrumentId)
  const iv = inst.interval.startsWith('-') ? inst.interval.slice(1) : `-${inst.interval}`
  return shift(parseNote(written).name, iv === '-1P' ? '1P' : iv)
}
