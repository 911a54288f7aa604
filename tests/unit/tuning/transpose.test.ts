import { describe, expect, it } from 'vitest'
import { computeTargets, concertNote, getInstrument, INSTRUMENTS, noteToMidi, TuningError, writtenNote } from '../../../shared/tuning/index'

// Standard transpositions (common practice; any orchestration handbook's table of transposing instruments).
describe('written and concert pitch', () => {
  it.each([
    ['trumpet-bb', 'D5', 'C5'], // B♭ trumpet reads a major second above sounding
    ['cornet-bb', 'D5', 'C5'],
    ['flugelhorn-bb', 'E4', 'D4'],
    ['clarinet-bb', 'D5', 'C5'],
    ['soprano-sax-bb', 'D5', 'C5'],
    ['horn-f', 'G4', 'C4'], // horn in F reads a perfect fifth above sounding
    ['tenor-horn-eb', 'A4', 'C4'], // E♭ tenor horn reads a major sixth above sounding
    ['alto-sax-eb', 'A4', 'C4'], // E♭ alto sax: written A4 sounds C4
    ['clarinet-a', 'Eb5', 'C5'], // A clarinet reads a minor third above sounding
    ['baritone-bb-treble', 'D5', 'C4'], // treble-clef baritone reads a major ninth above sounding
    ['euphonium-bb-treble', 'D5', 'C4'],
    ['tenor-sax-bb', 'D5', 'C4'],
    ['bass-clarinet-bb', 'D5', 'C4'],
    ['trombone-bb-treble', 'D5', 'C4'],
    ['eb-bass-treble', 'A4', 'C3'], // E♭ bass in treble clef: an octave and a major sixth
    ['baritone-sax-eb', 'A4', 'C3'],
    ['bb-bass-treble', 'D5', 'C3'], // B♭ bass in treble clef: two octaves and a major second
    ['soprano-cornet-eb', 'A4', 'C5'], // E♭ soprano cornet sounds a minor third above written
    ['clarinet-eb', 'A4', 'C5'],
    ['piccolo', 'C5', 'C6'], // piccolo sounds an octave above written
    ['voice-tenor', 'C5', 'C4'], // tenors read treble clef an octave above sounding
    ['voice-soprano', 'C5', 'C5'],
    ['voice-alto', 'G4', 'G4'],
    ['voice-bass', 'C3', 'C3'],
    ['trombone', 'Bb2', 'Bb2'], // bass-clef brass read at concert pitch
    ['bass-trombone', 'F2', 'F2'],
    ['euphonium-bass', 'Bb2', 'Bb2'],
    ['tuba-bass', 'Bb1', 'Bb1'],
    ['flute', 'C5', 'C5'],
    ['oboe', 'A4', 'A4'],
    ['bassoon', 'Bb1', 'Bb1'],
    ['concert', 'F#4', 'F#4'],
  ])('%s: written %s sounds %s', (id, written, concert) => {
    expect(concertNote(written, id)).toBe(concert)
    expect(writtenNote(concert, id)).toBe(written)
    expect(noteToMidi(written) - noteToMidi(concert)).toBe(INSTRUMENTS[id]!.semitones)
  })

  it.each([
    ['trumpet-bb', 'Bb4', 'C5'], // the B♭ trumpet's "C" is concert B♭ (common practice)
    ['alto-sax-eb', 'Eb4', 'C5'], // the E♭ alto's "C" is concert E♭
    ['horn-f', 'F3', 'C4'], // the F horn's "C" is concert F
    ['trumpet-bb', 'F#4', 'G#4'], // spelling follows the interval: a major second above F♯ is G♯
    ['alto-sax-eb', 'Db4', 'Bb4'],
    ['clarinet-a', 'C#5', 'E5'],
  ])('%s: concert %s is written %s', (id, concert, written) => {
    expect(writtenNote(concert, id)).toBe(written)
  })

  it('every instrument has a label, a clef and a transposition that round-trips', () => {
    for (const inst of Object.values(INSTRUMENTS)) {
      expect(inst.label.length).toBeGreaterThan(3)
      expect(['treble', 'treble-8vb', 'bass', 'alto', 'tenor']).toContain(inst.clef)
      expect(concertNote(writtenNote('Eb4', inst.id), inst.id)).toBe('Eb4')
    }
  })

  it('the tenor voice reads in treble clef an octave down', () => {
    expect(getInstrument('voice-tenor')).toMatchObject({ clef: 'treble-8vb', semitones: 12 })
  })

  it('an unknown instrument is refused with a clear message', () => {
    expect(() => writtenNote('C4', 'kazoo')).toThrow(TuningError)
    expect(() => getInstrument('kazoo')).toThrow(/"kazoo" is not an instrument we know/)
    expect(() => getInstrument('toString')).toThrow(TuningError)
  })

  it('targets carry the written note for the part\'s instrument', () => {
    const r = computeTargets({
      title: 'Brass', key: 'Bb major',
      parts: [{ name: 'Cornet', instrument: 'cornet-bb' }, { name: 'Horn', instrument: 'tenor-horn-eb' }, { name: 'Bass', instrument: 'bb-bass-treble' }, { name: 'Trombone', instrument: 'trombone' }],
      chords: [{ beats: 4, notes: { Cornet: 'D5', Horn: 'F4', Bass: 'Bb1', Trombone: 'Bb2' } }],
    })
    expect(r.chords[0]!.notes.map(n => n.writtenNote)).toEqual(['E5', 'D5', 'C4', 'Bb2'])
  })

  it('an unknown instrument in a drill names the field', () => {
    expect(() => computeTargets({ title: 'x', parts: [{ name: 'A', instrument: 'kazoo' }], chords: [{ beats: 1, notes: { A: 'C4' } }] }))
      .toThrow(expect.objectContaining({ path: 'parts.0.instrument' }))
  })
})
