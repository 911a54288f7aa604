import { Midi, Note } from '@tonaljs/tonal'
import { describe, expect, it } from 'vitest'
import {
  centsBetween, checkA4, equalHz, hzToMidi, midiToHz, noteToMidi, parseKey, parseNote, parsePitchClass, TuningError,
} from '../../../shared/tuning/index'

describe('note names and MIDI numbers', () => {
  it.each([
    ['A4', 69], // MIDI 1.0 specification: A4 (440 Hz) is note 69
    ['C4', 60], // MIDI 1.0 specification: middle C is note 60
    ['C-1', 0], // MIDI 1.0 specification: note 0 is C-1
    ['G9', 127], // MIDI 1.0 specification: note 127 is G9
    ['Bb3', 58], // common practice: B♭3 is a whole tone below C4
    ['A#3', 58], // common practice: A♯3 is enharmonic with B♭3
    ['F#4', 66], // common practice
    ['Cx5', 74], // common practice: C double sharp sounds as D
    ['C##5', 74], // common practice
    ['Ebb2', 38], // common practice: E double flat sounds as D
    ['B#3', 60], // common practice: B♯3 is enharmonic with C4 (octave number follows the letter)
    ['Cb5', 71], // common practice: C♭5 is enharmonic with B4
    ['B♭3', 58], // Unicode flat as pasted from a score
    ['F♯4', 66], // Unicode sharp
    ['D𝄪4', 64], // Unicode double sharp
  ])('%s is MIDI note %i', (name, midi) => {
    expect(noteToMidi(name)).toBe(midi)
  })

  it.each(['C4', 'Db4', 'F#2', 'Bb5', 'Cx3', 'Abb4', 'G9', 'C-1'])('%s agrees with @tonaljs/tonal Note.midi', name => {
    // Reference library from the npm registry.
    expect(noteToMidi(name)).toBe(Note.midi(name))
  })

  it.each([
    ['H4', 'unknown letter', /"H4" is not a note name with octave/],
    ['C', 'no octave', /"C" is not a note name with octave such as Bb3/],
    ['Bb', 'no octave', /"Bb" is not a note name with octave/],
    ['C#b4', 'mixed accidentals', /"C#b4" is not a note name/],
    ['Cbbb4', 'three flats', /"Cbbb4" has more than two accidentals/],
    ['G#9', 'above MIDI 127', /"G#9" is outside the MIDI range/],
    ['', 'empty', /"" is not a note name/],
    ['4C', 'octave first', /"4C" is not a note name/],
    ['C4 sharp', 'trailing words', /"C4 sharp" is not a note name/],
  ])('rejects %j (%s) with a clear message', (name, _, message) => {
    expect(() => noteToMidi(name)).toThrow(expect.objectContaining({ name: 'TuningError', code: 'unknown_note', message: expect.stringMatching(message) }))
  })

  it('names the field of a bad note when given a path', () => {
    expect(() => parseNote('H4', 'chords.2.notes.Alto')).toThrow(expect.objectContaining({ path: 'chords.2.notes.Alto' }))
  })

  it.each([['Eb', 3], ['F#', 6], ['Cb', 11], ['B#', 0], ['Bbb', 9]])('pitch class %s has chroma %i', (pc, chroma) => {
    expect(parsePitchClass(pc).chroma).toBe(chroma) // common practice: semitones above C
  })

  it.each(['Eb4', 'X', ''])('a pitch class %j with an octave or an unknown letter is refused', pc => {
    expect(() => parsePitchClass(pc)).toThrow(TuningError)
  })

  it.each([
    ['Eb major', 'Eb', 'major'],
    ['c minor', 'C', 'minor'],
    ['F# Minor', 'F#', 'minor'],
  ])('key %j', (key, tonic, mode) => {
    const k = parseKey(key)
    expect(k.tonic.pc).toBe(tonic)
    expect(k.mode).toBe(mode)
  })

  it.each(['E flat major', 'C dorian', 'major', 'H major'])('key %j is refused', key => {
    expect(() => parseKey(key)).toThrow(expect.objectContaining({ code: expect.stringMatching(/bad_key|unknown_note/) }))
  })
})

describe('frequencies', () => {
  it('A4 = 440 Hz at the standard reference (ISO 16:1975) and is MIDI note 69', () => {
    expect(midiToHz(69)).toBe(440)
    expect(equalHz('A4')).toBe(440)
  })

  it.each([
    [60, 440, 261.6255653005986], // MIDI Tuning Standard: f = 440·2^((n−69)/12); middle C ≈ 261.626 Hz (common practice)
    [57, 440, 220], // an octave below A4 is 220 Hz (definition of the octave, 2/1)
    [81, 440, 880],
    [69, 442, 442],
    [69, 415, 415], // Baroque pitch A = 415 Hz (common practice)
    [70, 440, 440 * 2 ** (1 / 12)], // one equal-tempered semitone is 2^(1/12) (definition)
    [0, 440, 8.175798915643707], // MIDI Tuning Standard: note 0 ≈ 8.176 Hz
  ])('MIDI %i at A4 = %i Hz is %f Hz (MIDI Tuning Standard: f = a4·2^((n−69)/12))', (midi, a4, hz) => {
    expect(midiToHz(midi, a4)).toBeCloseTo(hz, 9)
  })

  it.each(['C4', 'C#4', 'Eb5', 'F#2', 'A0', 'Bb6', 'Cx3'])('%s at 440 Hz agrees with @tonaljs/tonal Note.freq', name => {
    expect(equalHz(name)).toBeCloseTo(Note.freq(name)!, 9) // reference library
  })

  it.each([[60, 415], [69, 432], [47, 442], [100, 466]])('MIDI %i at A4 = %i Hz agrees with @tonaljs/tonal Midi.midiToFreq', (midi, a4) => {
    expect(midiToHz(midi, a4)).toBeCloseTo(Midi.midiToFreq(midi, a4), 9) // reference library
  })

  it.each([[440, 440, 69], [261.6255653005986, 440, 60], [466.1637615180899, 440, 70], [221, 442, 57]])('hzToMidi(%f, %i) = %f', (hz, a4, midi) => {
    expect(hzToMidi(hz, a4)).toBeCloseTo(midi, 9)
  })

  it('hzToMidi agrees with @tonaljs/tonal Midi.freqToMidi (which rounds to two decimals)', () => {
    for (const hz of [100, 261, 440, 1000, 3520]) expect(hzToMidi(hz)).toBeCloseTo(Midi.freqToMidi(hz), 2)
  })

  it.each([
    [440, 880, 1200], // the octave is 1200 cents (definition of the cent)
    [440, 220, -1200],
    [100, 150, 701.955], // 3/2 = 701.955 ¢ (1200·log2(3/2))
    [400, 500, 386.314], // 5/4 = 386.314 ¢ (1200·log2(5/4))
    [440, 440, 0],
  ])('centsBetween(%f, %f) = %f', (f1, f2, cents) => {
    expect(centsBetween(f1, f2)).toBeCloseTo(cents, 3)
  })

  it.each([0, -440, Number.NaN, Number.POSITIVE_INFINITY])('centsBetween refuses %f instead of returning NaN', f => {
    expect(() => centsBetween(f, 440)).toThrow(TuningError)
    expect(() => centsBetween(440, f)).toThrow(TuningError)
    expect(() => hzToMidi(f)).toThrow(TuningError)
  })

  it.each([414.9, 466.1, 0, 880, Number.NaN])('a reference of %f Hz is outside 415–466 and refused', a4 => {
    expect(() => checkA4(a4)).toThrow(expect.objectContaining({ code: 'a4_out_of_range' }))
    expect(() => midiToHz(69, a4)).toThrow(/415 to 466/)
  })

  it.each([415, 440, 466])('a reference of %i Hz is accepted', a4 => {
    expect(checkA4(a4)).toBe(a4)
  })

  it('refuses a non-finite MIDI number', () => {
    expect(() => midiToHz(Number.NaN)).toThrow(TuningError)
  })
})
