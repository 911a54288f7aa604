import { readFileSync } from 'node:fs'
import { describe, expect, it } from 'vitest'
import { zipSync, strToU8 } from 'fflate'
import { musicXmlToDrill, parseBars, readMxl, soundingNote, voiceNames } from '../../../shared/drill/musicxml'
import { readDrillFile, renameParts } from '../../../shared/drill/import'

const fixture = (name: string) => new Uint8Array(readFileSync(new URL(`../../fixtures/musicxml/${name}`, import.meta.url)))
const read = (name: string, opts: { bars?: string, title?: string } = {}) => readDrillFile(fixture(name), { fileName: name, ...opts })
const notesOf = (drill: { chords: { notes: Record<string, string | null> }[] }, part: string) => drill.chords.map(c => c.notes[part])

const PARTWISE = (body: string, parts = '<score-part id="P1"><part-name>Voice</part-name></score-part>') => `<?xml version="1.0"?>
<score-partwise version="4.0"><part-list>${parts}</part-list>${body}</score-partwise>`

describe('MusicXML import: closed-score hymn (voice + backup, forward, ties, alter, two parts)', () => {
  // Expected values worked out by hand from the score; see the comment at the top of the fixture.
  const { format, drill, warnings } = read('closed-score-hymn.musicxml')

  it('makes one drill part per voice, top to bottom, named from the part names "Soprano/Alto" and "Tenor/Bass"', () => {
    expect(format).toBe('musicxml')
    expect(drill.parts.map(p => p.name)).toEqual(['Soprano', 'Alto', 'Tenor', 'Bass'])
    expect(warnings).toEqual([])
  })

  it('reads <alter>-1 as a flat (MusicXML 4.0 <alter>: -1 is a semitone down)', () => {
    expect(notesOf(drill, 'Tenor')[0]).toBe('Bb3')
    expect(notesOf(drill, 'Alto')[4]).toBe('Eb4')
  })

  it('starts a chord wherever the sounding set changes; the ties over bar 2–3 make one 4-beat chord', () => {
    expect(drill.chords.map(c => c.beats)).toEqual([2, 2, 1, 1, 4, 2])
    expect(notesOf(drill, 'Soprano')).toEqual(['D5', 'C5', 'Bb4', 'Bb4', 'C5', 'D5'])
    expect(notesOf(drill, 'Alto')).toEqual(['F4', 'F4', 'F4', 'F4', 'Eb4', 'D4'])
    expect(notesOf(drill, 'Tenor')).toEqual(['Bb3', 'A3', 'D4', 'D4', 'A3', 'Bb3'])
  })

  it('reads <forward> within a voice as a rest in that voice (MusicXML 4.0 <forward>: an invisible rest)', () => {
    expect(notesOf(drill, 'Bass')).toEqual(['Bb2', 'F2', 'Bb2', null, 'F2', 'Bb2'])
  })

  it('takes key (fifths -2 = B-flat major, circle of fifths, common practice), <sound tempo> (quarters per minute), title and <harmony>', () => {
    expect(drill.key).toBe('Bb major')
    expect(drill.tempo).toBe(72)
    expect(drill.title).toBe('Harbour Evening')
    expect(drill.chords[0]!.symbol).toBe('Bb')
  })

  it('keeps only the bars asked for, clipping notes held across the edge', () => {
    const part = read('closed-score-hymn.musicxml', { bars: '3-3' }).drill
    // Bar 3 alone: the tied chord's second half (2 beats), then the last chord.
    expect(part.chords.map(c => c.beats)).toEqual([2, 2])
    expect(notesOf(part, 'Soprano')).toEqual(['C5', 'D5'])
  })
})

describe('MusicXML import: compressed .mxl', () => {
  it('follows META-INF/container.xml to the score in a sub-folder (MusicXML 4.0 compressed file format)', () => {
    const mxl = read('closed-score-hymn.mxl')
    expect(mxl.format).toBe('mxl')
    expect(mxl.drill).toEqual(read('closed-score-hymn.musicxml').drill)
  })

  it('finds the score without a container, and says so when there is none', () => {
    const score = fixture('crossing-voices.musicxml')
    expect(readMxl(zipSync({ 'song.musicxml': score }))).toContain('score-partwise')
    expect(() => readMxl(zipSync({ 'readme.txt': strToU8('hello') }))).toThrow(expect.objectContaining({ code: 'mxl_unreadable' }))
    expect(() => readMxl(new Uint8Array([0x50, 0x4b, 0x03, 0x04, 1, 2, 3]))).toThrow(expect.objectContaining({ code: 'mxl_unreadable' }))
  })
})

describe('MusicXML import: <chord/> notes and a part that divides mid-phrase', () => {
  const { drill, warnings } = read('chord-notes-divisi.musicxml')

  it('splits chord notes of one voice top to bottom into numbered parts', () => {
    expect(drill.parts.map(p => p.name)).toEqual(['Women 1', 'Women 2', 'Men 1', 'Men 2'])
    expect(notesOf(drill, 'Women 2')).toEqual(['G4', 'F#4', 'G4', 'A4', null])
    expect(notesOf(drill, 'Men 2')).toEqual(['G3', 'D3', 'D4', 'A3', 'D3'])
  })

  it('gives both parts the one note where the part does not divide, and says in which bar', () => {
    expect(drill.chords[2]!.notes).toMatchObject({ 'Men 1': 'D4', 'Men 2': 'D4' })
    expect(warnings).toEqual([expect.stringMatching(/"Men" divides .* bar 2 Men 1 and Men 2 share a note/)])
  })

  it('ignores grace notes (MusicXML 4.0 <grace>: no <duration>) and converts a half-note metronome mark', () => {
    expect(drill.chords.map(c => c.beats)).toEqual([2, 2, 4, 2, 2])
    expect(drill.tempo).toBe(80) // 40 half notes a minute = 80 quarter notes (common practice)
    expect(drill.key).toBe('G major')
  })
})

describe('MusicXML import: crossing voices', () => {
  it('keeps each voice in its own part and names the bar where they cross (bar numbers from the score)', () => {
    const { drill, warnings } = read('crossing-voices.musicxml')
    expect(drill.parts.map(p => p.name)).toEqual(['Soprano', 'Alto'])
    expect(notesOf(drill, 'Soprano')).toEqual(['E5', 'G4', 'E5'])
    expect(notesOf(drill, 'Alto')).toEqual(['C5', 'B4', 'G4'])
    expect(warnings).toContain('Bar 6: Alto goes above Soprano (the voices cross); each part keeps its own voice as written')
  })

  it('bar ranges use the score\'s bar numbers and refuse bars it does not have', () => {
    expect(read('crossing-voices.musicxml', { bars: '6-7' }).drill.chords).toHaveLength(2)
    expect(() => read('crossing-voices.musicxml', { bars: '1-2' })).toThrow(/Bar 1 is not in this score \(its bars are numbered 5–7\)/)
  })
})

describe('MusicXML import: transposing parts read at concert pitch', () => {
  const { drill } = read('transposing-band.musicxml')

  it('B-flat trumpet (<chromatic>-2, <diatonic>-1): written C5 sounds B-flat 4, written E5 sounds D5', () => {
    // A B-flat instrument sounds a major second below written (common practice; MusicXML 4.0 <transpose>).
    expect(notesOf(drill, 'Trumpet')).toEqual(['Bb4', 'D5'])
    expect(drill.parts[0]!.instrument).toBe('trumpet-bb')
  })

  it('E-flat alto saxophone (<chromatic>-9, <diatonic>-5): written E5 sounds G4, written D5 sounds F4', () => {
    // An E-flat alto saxophone sounds a major sixth below written (common practice).
    expect(notesOf(drill, 'Alto Saxophone')).toEqual(['G4', 'F4'])
    expect(drill.parts[1]!.instrument).toBe('alto-sax-eb')
  })

  it('takes the key from the concert-pitch part and says when the score has no tempo', () => {
    const warnings: string[] = []
    const d = musicXmlToDrill(new TextDecoder().decode(fixture('transposing-band.musicxml')), { warnings })
    expect(d.key).toBe('Eb major')
    expect(notesOf(d, 'Trombone')).toEqual(['Eb3', 'Bb2'])
    expect(warnings).toContain('The score gives no tempo; the drill uses 60 beats per minute')
  })

  it.each([
    // [written step, alter, octave, transpose, sounding] — MusicXML 4.0: chromatic and octave-change are added to the written pitch.
    ['D', 0, 5, { diatonic: -1, chromatic: -2, octaveChange: 0 }, 'C5'], // B-flat clarinet: written D5 sounds C5
    ['G', 0, 4, { diatonic: -4, chromatic: -7, octaveChange: 0 }, 'C4'], // horn in F: written G4 sounds C4 (perfect fifth lower)
    ['D', 0, 5, { diatonic: -1, chromatic: -2, octaveChange: -1 }, 'C4'], // tenor saxophone: a major ninth lower
    ['C', 0, 5, { diatonic: -5, chromatic: -9, octaveChange: -1 }, 'Eb3'], // baritone saxophone: an octave and a major sixth lower
    ['F', 1, 4, { diatonic: -1, chromatic: -2, octaveChange: 0 }, 'E4'], // F-sharp written on a B-flat instrument sounds E
  ] as const)('written %s (alter %i) octave %i with %o sounds %s', (step, alter, octave, tr, sounding) => {
    expect(soundingNote(step, alter, octave, tr).name).toBe(sounding)
  })
})

describe('MusicXML import: bad input is refused with a message naming the place', () => {
  const text = (s: string) => new TextEncoder().encode(s)

  it('not XML: names the line', () => {
    expect(() => readDrillFile(text('<score-partwise>\n<part-list>\n</score-partwise>'), { fileName: 'broken.musicxml' }))
      .toThrow(expect.objectContaining({ code: 'not_xml', message: expect.stringMatching(/not well-formed XML: line \d+/) }))
  })

  it('XML that is not a partwise score', () => {
    expect(() => musicXmlToDrill('<html><body/></html>')).toThrow(expect.objectContaining({ code: 'not_musicxml' }))
    expect(() => musicXmlToDrill('<score-timewise/>')).toThrow(expect.objectContaining({ code: 'musicxml_timewise' }))
  })

  it('a score with only rests and unpitched notes has no pitched notes', () => {
    const body = `<part id="P1"><measure number="1"><attributes><divisions>1</divisions></attributes>
      <note><rest/><duration>2</duration><voice>1</voice></note>
      <note><unpitched><display-step>E</display-step><display-octave>4</display-octave></unpitched><duration>2</duration><voice>1</voice></note>
    </measure></part>`
    expect(() => musicXmlToDrill(PARTWISE(body))).toThrow(expect.objectContaining({ code: 'no_pitched_notes', message: expect.stringMatching(/no pitched notes/) }))
  })

  it('a note without a valid step names the bar and the part', () => {
    const body = '<part id="P1"><measure number="4"><note><pitch><step>H</step><octave>4</octave></pitch><duration>1</duration></note></measure></part>'
    expect(() => musicXmlToDrill(PARTWISE(body))).toThrow(/Bar 4 of "Voice": a note has no valid <step>/)
  })

  it('a file of no format we read', () => {
    expect(() => readDrillFile(new Uint8Array([0, 1, 2, 3, 4]), { fileName: 'x.bin' })).toThrow(expect.objectContaining({ code: 'unknown_format' }))
  })

  it.each([['3-6', { from: 3, to: 6 }], ['4', { from: 4, to: 4 }], [' 2 – 5 ', { from: 2, to: 5 }], ['', undefined]])('bars "%s"', (text, range) => {
    expect(parseBars(text)).toEqual(range)
  })

  it.each(['6-3', 'a-b', '3-', '1,2'])('refuses bars "%s"', (text) => {
    expect(() => parseBars(text)).toThrow(expect.objectContaining({ code: 'invalid_bars' }))
  })
})

describe('part names and renaming', () => {
  it.each([
    ['Soprano/Alto', 2, ['Soprano', 'Alto']],
    ['S. A.', 2, ['Soprano', 'Alto']],
    ['SATB', 4, ['Soprano', 'Alto', 'Tenor', 'Bass']],
    ['Tenor & Bass', 2, ['Tenor', 'Bass']],
    ['Women', 2, ['Women 1', 'Women 2']],
    ['Choir', 1, ['Choir']],
  ] as const)('"%s" in %i voices', (name, count, names) => {
    expect(voiceNames(name, count)).toEqual(names)
  })

  it('renames imported parts to section names in every chord, and refuses two parts of one name', () => {
    const { drill } = read('chord-notes-divisi.musicxml')
    const renamed = renameParts(drill, { 'Women 1': 'Soprano', 'Women 2': 'Alto' })
    expect(renamed.parts.map(p => p.name)).toEqual(['Soprano', 'Alto', 'Men 1', 'Men 2'])
    expect(renamed.chords[0]!.notes).toEqual({ 'Soprano': 'B4', 'Alto': 'G4', 'Men 1': 'D4', 'Men 2': 'G3' })
    expect(() => renameParts(drill, { 'Women 1': 'Men 2' })).toThrow(/Two parts would both be named "Men 2"/)
    expect(() => renameParts(drill, { Tenor: 'Bass' })).toThrow(/no part "Tenor"/)
  })
})

describe('files built to exhaust the server are refused', () => {
  it('an internal DTD declaring entities (they could expand without bound; MusicXML needs none)', () => {
    const text = '<?xml version="1.0"?><!DOCTYPE score-partwise [<!ENTITY a "aaaaaaaaaa"><!ENTITY b "&a;&a;&a;&a;">]><score-partwise>&b;</score-partwise>'
    expect(() => musicXmlToDrill(text)).toThrow(expect.objectContaining({ code: 'xml_entities' }))
  })

  it('an .mxl whose score unpacks to more than 32 MB', () => {
    const huge = new Uint8Array(33 * 1024 * 1024) // zeros compress about a thousand to one
    expect(() => readMxl(zipSync({ 'score.musicxml': huge }))).toThrow(expect.objectContaining({ code: 'mxl_too_large' }))
  })
})
