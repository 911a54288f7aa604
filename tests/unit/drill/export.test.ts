import { describe, expect, it } from 'vitest'
import pkg from '@tonejs/midi'
import { drillToMusicXml, exportFileName, keyFifths } from '../../../shared/drill/export-musicxml'
import { drillToMidi } from '../../../shared/drill/export-midi'
import { readDrillFile } from '../../../shared/drill/import'
import { midiToDrill } from '../../../shared/drill/midi'
import { parseDrill, type DrillInput } from '../../../shared/drill/schema'

const { Midi } = pkg

// An invented brass-band drill: transposing parts, a tenor voice, uneven lengths, common tones,
// a chord sounded twice, a rest, chord symbols and non-default settings.
const BAND: DrillInput = {
  title: 'Quarry Chorale, Tuning Study',
  key: 'Eb major',
  tempo: 66,
  a4: 442,
  tolerance: 7.5,
  system: { name: 'just-common', seventh: '5-limit' },
  parts: [
    { name: 'Cornet', instrument: 'cornet-bb' },
    { name: 'Tenor Horn', instrument: 'tenor-horn-eb' },
    { name: 'Sung Tenor', instrument: 'voice-tenor' },
    { name: 'Eb Bass', instrument: 'eb-bass-treble' },
    { name: 'Horn', instrument: 'horn-f' },
  ],
  chords: [
    { beats: 3, symbol: 'Eb', notes: { 'Cornet': 'G4', 'Tenor Horn': 'Eb4', 'Sung Tenor': 'Bb3', 'Eb Bass': 'Eb2', 'Horn': 'Bb3' } },
    { beats: 1.5, symbol: 'Ab/Eb', notes: { 'Cornet': 'Ab4', 'Tenor Horn': 'Eb4', 'Sung Tenor': 'C4', 'Eb Bass': 'Eb2', 'Horn': 'Ab3' } },
    { beats: 0.5, notes: { 'Cornet': 'Ab4', 'Tenor Horn': 'Eb4', 'Sung Tenor': 'C4', 'Eb Bass': 'Eb2', 'Horn': 'Ab3' } },
    { beats: 6, symbol: 'Bb7', notes: { 'Cornet': 'F4', 'Tenor Horn': 'D4', 'Sung Tenor': 'Ab3', 'Eb Bass': 'Bb1', 'Horn': 'Bb3' } },
    { beats: 1, notes: { 'Cornet': null, 'Tenor Horn': null, 'Sung Tenor': null, 'Eb Bass': 'Eb2', 'Horn': null } },
    { beats: 4, symbol: 'Cm7', notes: { 'Cornet': 'G4', 'Tenor Horn': 'Eb4', 'Sung Tenor': 'Bb3', 'Eb Bass': 'C2', 'Horn': 'G3' } },
  ],
}

describe('MusicXML export and round trip', () => {
  const drill = parseDrill(BAND)

  it.each(['written', 'concert'] as const)('importing the %s-pitch export gives back the same drill', (pitch) => {
    const xml = drillToMusicXml(drill, { pitch })
    const back = readDrillFile(new TextEncoder().encode(xml), { fileName: exportFileName(drill.title, 'musicxml') })
    expect(back.drill).toEqual(drill)
    expect(back.warnings).toEqual([])
  })

  it('writes <transpose> as what to add to the written pitch (MusicXML 4.0 <transpose>)', () => {
    const xml = drillToMusicXml(drill)
    // B-flat cornet: written a major second above sounding → diatonic -1, chromatic -2 (common practice).
    expect(xml).toContain('<transpose><diatonic>-1</diatonic><chromatic>-2</chromatic></transpose>')
    // E-flat tenor horn: a major sixth → diatonic -5, chromatic -9; horn in F: a perfect fifth → -4, -7.
    expect(xml).toContain('<transpose><diatonic>-5</diatonic><chromatic>-9</chromatic></transpose>')
    expect(xml).toContain('<transpose><diatonic>-4</diatonic><chromatic>-7</chromatic></transpose>')
    // E-flat bass in treble clef: an octave and a major sixth → octave-change -1 (MusicXML 4.0 <octave-change>).
    expect(xml).toContain('<transpose><diatonic>-5</diatonic><chromatic>-9</chromatic><octave-change>-1</octave-change></transpose>')
    // The tenor voice reads the octave treble clef (MusicXML 4.0 <clef-octave-change>: -1 for a tenor's treble clef).
    expect(xml).toContain('<clef><sign>G</sign><line>2</line><clef-octave-change>-1</clef-octave-change></clef>')
    // Written keys: E-flat major concert is F major for B-flat instruments (1 flat) and C major for E-flat ones.
    expect(xml).toMatch(/<part id="P1">\s*<measure number="1">\s*<attributes><divisions>2<\/divisions><key><fifths>-1<\/fifths>/)
    expect(xml).toMatch(/<part id="P2">\s*<measure number="1">\s*<attributes><divisions>2<\/divisions><key><fifths>0<\/fifths>/)
    expect(drillToMusicXml(drill, { pitch: 'concert' })).not.toContain('<transpose>')
  })

  it('ties a chord held across the bar line and fills the last bar with a rest (4/4)', () => {
    const xml = drillToMusicXml(drill)
    // 3 + 1.5 + 0.5 + 6 + 1 + 4 = 16 beats = four bars of 4/4.
    expect(xml.match(/<measure number=/g)).toHaveLength(4 * drill.parts.length)
    expect(xml).toContain('<tie type="start"/>')
    expect(xml).toContain('<tie type="stop"/>')
  })

  it.each([
    ['C major', 0], ['Eb major', -3], ['A major', 3], ['C minor', -3], ['F# minor', 3], ['D# major', -3],
  ] as const)('key %s has %i fifths (circle of fifths, common practice)', (key, fifths) => {
    expect(keyFifths(key).fifths).toBe(fifths)
  })

  it('file names come from the title without characters file systems refuse', () => {
    expect(exportFileName('Hymn: "Evening" / 2', 'mid')).toBe('Hymn 2.mid'.replace('Hymn 2', 'Hymn Evening 2'))
    expect(exportFileName('   ', 'json')).toBe('drill.json')
  })
})

describe('MIDI export and round trip', () => {
  const drill = parseDrill(BAND)

  it('importing the export gives back the same drill (title from the file name)', () => {
    const bytes = drillToMidi(drill)
    const back = readDrillFile(bytes, { fileName: exportFileName(drill.title, 'mid') })
    expect(back.format).toBe('midi')
    expect(back.drill).toEqual(drill)
  })

  it('writes the key signature and tempo as the Standard MIDI File spec says', () => {
    const bytes = drillToMidi(drill)
    const hex = Buffer.from(bytes).toString('hex')
    // SMF 1.0 meta event FF 59 02 sf mi: E-flat major = 3 flats (sf = -3 = 0xfd), mi = 0.
    expect(hex).toContain('ff5902fd00')
    // SMF 1.0 meta event FF 51 03 tttttt: microseconds per quarter note, 60 000 000 / 66 = 909 090 = 0x0ddf22.
    expect(hex).toContain('ff51030ddf22')
    const midi = new Midi(bytes)
    expect(midi.tracks.map(t => t.name)).toEqual(drill.parts.map(p => p.name))
    // Common tones are held: the bass's E-flat over chords 1 and 2 is one note of 4.5 beats; chord 3
    // repeats chord 2 in every part, so it is sounded again.
    expect(midi.tracks[3]!.notes.slice(0, 2).map(n => n.durationTicks / midi.header.ppq)).toEqual([4.5, 0.5])
  })

  it('title: the title field first, else the file name, else the file\'s own name', () => {
    const bytes = drillToMidi(drill)
    expect(midiToDrill(bytes, { title: 'Warm-up', fileName: 'x.mid' }).title).toBe('Warm-up')
    expect(midiToDrill(bytes, { fileName: 'Tuesday chorale.mid' }).title).toBe('Tuesday chorale')
    expect(midiToDrill(bytes).title).toBe(drill.title)
  })

  it('keeps a bar range (4/4: bar 2 starts at beat 4)', () => {
    const d = midiToDrill(drillToMidi(drill), { bars: { from: 2, to: 2 } })
    expect(d.chords.reduce((s, c) => s + c.beats, 0)).toBe(4)
    expect(d.chords[0]!.notes.Cornet).toBe('Ab4')
  })

  it('a file with no note events says so', () => {
    const m = new Midi()
    m.addTrack().name = 'Silent'
    expect(() => readDrillFile(new Uint8Array(m.toArray()), { fileName: 'silent.mid' })).toThrow(/no tracks with notes \(no note events\)/)
  })
})
