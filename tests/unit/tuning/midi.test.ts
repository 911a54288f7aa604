import pkg from '@tonejs/midi'
import { describe, expect, it } from 'vitest'
import { midiToDrill } from '../../../shared/drill/midi'
import { computeTargets, TuningError } from '../../../shared/tuning/index'

const { Midi } = pkg

type N = [midi: number, startBeat: number, beats: number]

/** Writes a Standard MIDI File with @tonejs/midi's own encoder: one track per part. */
function smf(tracks: Record<string, N[]>, opts: { bpm?: number, key?: string, scale?: 'major' | 'minor', timeSignature?: [number, number], name?: string, channel?: Record<string, number> } = {}): Uint8Array {
  const m = new Midi()
  const ppq = m.header.ppq
  if (opts.bpm) m.header.setTempo(opts.bpm)
  if (opts.key) m.header.keySignatures.push({ ticks: 0, key: opts.key, scale: opts.scale ?? 'major' })
  if (opts.timeSignature) m.header.timeSignatures.push({ ticks: 0, timeSignature: opts.timeSignature, measures: 0 })
  if (opts.name) m.header.name = opts.name
  m.header.update()
  for (const [name, notes] of Object.entries(tracks)) {
    const t = m.addTrack()
    t.name = name
    if (opts.channel?.[name] !== undefined) t.channel = opts.channel[name]!
    for (const [midi, start, beats] of notes) t.addNote({ midi, ticks: Math.round(start * ppq), durationTicks: Math.round(beats * ppq) })
  }
  return fixKeySignature(m.toArray(), opts.key, opts.scale)
}

// @tonejs/midi's encoder stores the key-signature byte as (index + 7) instead of the Standard MIDI
// File's signed count of sharps (+) or flats (−); write the standard byte so the file is a real SMF.
const SHARPS_FLATS: Record<string, number> = { Cb: -7, Gb: -6, Db: -5, Ab: -4, Eb: -3, Bb: -2, F: -1, C: 0, G: 1, D: 2, A: 3, E: 4, B: 5, 'F#': 6, 'C#': 7 }
// A minor key's signature is its relative major's (SMF 1.0, meta event FF 59 02 sf mi: sf counts the
// signature's sharps or flats, mi = 1 for minor), so C minor is three flats.
function fixKeySignature(bytes: Uint8Array, key?: string, scale?: 'major' | 'minor'): Uint8Array {
  if (!key) return bytes
  const sf = SHARPS_FLATS[key]! - (scale === 'minor' ? 3 : 0)
  for (let i = 0; i + 4 < bytes.length; i++) {
    if (bytes[i] === 0xff && bytes[i + 1] === 0x59 && bytes[i + 2] === 0x02) bytes[i + 3] = sf & 0xff
  }
  return bytes
}

/**
 * A format 1 Standard MIDI File written byte by byte (Standard MIDI Files 1.0: MThd, MTrk chunks,
 * meta event FF 03 = sequence/track name, 9n/8n = note on/off, FF 2F 00 = end of track) with no
 * conductor track: the first track is a part, so its name is the part's, not the piece's.
 */
function rawSmf(tracks: { name: string, note: number }[]): Uint8Array {
  const bytes: number[] = []
  const u32 = (n: number) => [(n >>> 24) & 255, (n >>> 16) & 255, (n >>> 8) & 255, n & 255]
  const u16 = (n: number) => [(n >>> 8) & 255, n & 255]
  bytes.push(...[0x4d, 0x54, 0x68, 0x64], ...u32(6), ...u16(1), ...u16(tracks.length), ...u16(480))
  tracks.forEach((t, i) => {
    const name = [...new TextEncoder().encode(t.name)]
    // Delta 960 ticks (two quarter notes) as a variable-length quantity: 0x87 0x40.
    const body = [0x00, 0xff, 0x03, name.length, ...name, 0x00, 0x90 + i, t.note, 0x50, 0x87, 0x40, 0x80 + i, t.note, 0x40, 0x00, 0xff, 0x2f, 0x00]
    bytes.push(...[0x4d, 0x54, 0x72, 0x6b], ...u32(body.length), ...body)
  })
  return new Uint8Array(bytes)
}

describe('MIDI import title', () => {
  const file = rawSmf([{ name: 'Tenor', note: 57 }, { name: 'Bass', note: 45 }])

  it('never takes a part\'s track name for the title', () => {
    const drill = midiToDrill(file)
    expect(drill.parts.map(p => p.name)).toEqual(['Tenor', 'Bass'])
    expect(drill.title).not.toBe('Tenor')
    expect(drill.title).toBe('Imported from MIDI')
  })

  it('uses the file\'s name (without folders and extension) when no title is typed', () => {
    expect(midiToDrill(file, { fileName: 'Evening_hymn.mid' }).title).toBe('Evening hymn')
    expect(midiToDrill(file, { fileName: 'scores/Long tones in Bb.MIDI' }).title).toBe('Long tones in Bb')
  })

  it('a typed title wins over the file\'s name', () => {
    expect(midiToDrill(file, { title: 'Tuning the tenors', fileName: 'Evening_hymn.mid' }).title).toBe('Tuning the tenors')
  })

  it('keeps a sequence name that names no part', () => {
    const named = smf({ Soprano: [[72, 0, 2]] }, { name: 'Chorale' })
    expect(midiToDrill(named).title).toBe('Chorale')
    expect(midiToDrill(named, { fileName: 'take-this.mid' }).title).toBe('take-this')
  })
})

describe('MIDI import', () => {
  it('one part per track named after it, chords where the sounding set changes, tempo from the file', () => {
    const bytes = smf({
      Soprano: [[72, 0, 2], [72, 2, 2], [74, 4, 4]],
      Alto: [[64, 0, 4], [65, 4, 4]],
      Bass: [[48, 0, 2], [45, 2, 2], [50, 4, 4]],
    }, { bpm: 72, name: 'Chorale' })
    const drill = midiToDrill(bytes)
    expect(drill.title).toBe('Chorale')
    expect(drill.tempo).toBeCloseTo(72, 3)
    expect(drill.parts.map(p => p.name)).toEqual(['Soprano', 'Alto', 'Bass'])
    expect(drill.chords).toEqual([
      { beats: 2, notes: { Soprano: 'C5', Alto: 'E4', Bass: 'C3' } },
      { beats: 2, notes: { Soprano: 'C5', Alto: 'E4', Bass: 'A2' } }, // the soprano re-strikes: a new chord
      { beats: 4, notes: { Soprano: 'D5', Alto: 'F4', Bass: 'D3' } },
    ])
  })

  it('a held note across a change in another part splits the chord; a rest is null', () => {
    const drill = midiToDrill(smf({ Top: [[67, 0, 4]], Low: [[48, 0, 1], [52, 2, 2]] }))
    expect(drill.chords).toEqual([
      { beats: 1, notes: { Top: 'G4', Low: 'C3' } },
      { beats: 1, notes: { Top: 'G4', Low: null } },
      { beats: 2, notes: { Top: 'G4', Low: 'E3' } },
    ])
  })

  it('a silent opening is kept as a rest so the timeline matches the file', () => {
    const drill = midiToDrill(smf({ Solo: [[69, 1, 3]] }))
    expect(drill.chords).toEqual([{ beats: 1, notes: { Solo: null } }, { beats: 3, notes: { Solo: 'A4' } }])
  })

  it('tempo defaults to 120 when the file has none (Standard MIDI File default, 500 000 µs per quarter)', () => {
    expect(midiToDrill(smf({ A: [[60, 0, 1]] })).tempo).toBe(120)
  })

  it.each([
    ['Eb', 'major', [63, 68, 70, 61], ['Eb4', 'Ab4', 'Bb4', 'Db4']],
    ['E', 'major', [68, 63, 66], ['G#4', 'D#4', 'F#4']],
    ['Gb', 'major', [71], ['Cb5']], // C♭ is the fourth of G♭ major (common practice)
    ['C', 'minor', [71, 69, 63, 68], ['B4', 'A4', 'Eb4', 'Ab4']], // the minor's raised seventh and sixth, flats of its signature
  ])('spells notes in the file\'s key %s %s', (key, scale, midis, names) => {
    const drill = midiToDrill(smf({ A: midis.map((m, i) => [m, i, 1] as N) }, { key, scale: scale as 'major' | 'minor' }))
    expect(drill.key).toBe(`${key} ${scale}`)
    expect(drill.chords.map(c => c.notes.A)).toEqual(names)
  })

  it('the imported drill is scored like any other', () => {
    const drill = midiToDrill(smf({ S: [[72, 0, 2], [72, 2, 2], [74, 4, 2], [74, 6, 2], [72, 8, 2]], A: [[64, 0, 2], [64, 2, 2], [65, 4, 2], [67, 6, 2], [67, 8, 2]], T: [[55, 0, 2], [57, 2, 2], [57, 4, 2], [59, 6, 2], [64, 8, 2]], B: [[48, 0, 2], [45, 2, 2], [50, 4, 2], [43, 6, 2], [48, 8, 2]] }))
    const r = computeTargets(drill, { name: 'just-common' })
    expect(r.driftCents).toBeCloseTo(-21.506, 3) // the comma pump, one syntonic comma (common practice)
  })

  it('a file with no tracks is refused', () => {
    // Header chunk only: format 1, no tracks, 480 ticks per quarter (Standard MIDI File layout).
    const bytes = new Uint8Array([0x4d, 0x54, 0x68, 0x64, 0, 0, 0, 6, 0, 1, 0, 0, 0x01, 0xe0])
    expect(() => midiToDrill(bytes)).toThrow(expect.objectContaining({ code: 'midi_no_tracks', message: 'The MIDI file has no tracks' }))
  })

  it('a file whose tracks have no notes is refused', () => {
    const m = new Midi()
    m.addTrack().name = 'Empty'
    expect(() => midiToDrill(m.toArray())).toThrow(expect.objectContaining({ code: 'midi_no_tracks', message: expect.stringMatching(/no tracks with notes/) }))
  })

  it('overlapping notes in one part name the track and the bar', () => {
    const bytes = smf({ Soprano: [[72, 0, 4]], Alto: [[64, 0, 4], [64, 4, 2], [67, 5, 2]] }, { timeSignature: [4, 4] })
    let err: TuningError | undefined
    try { midiToDrill(bytes) } catch (e) { err = e as TuningError }
    expect(err).toBeInstanceOf(TuningError)
    expect(err!.code).toBe('midi_overlap')
    expect(err!.message).toMatch(/Track 2 "Alto" has overlapping notes in bar 2 \(E4 and G4 sound together\)/)
    expect(err!.path).toBe('track 2, bar 2')
  })

  it('counts bars in the file\'s time signature (3/4)', () => {
    const bytes = smf({ Alto: [[64, 6, 2], [67, 7, 2]] }, { timeSignature: [3, 4] })
    expect(() => midiToDrill(bytes)).toThrow(/bar 3/)
  })

  it('two notes starting together in one part are an overlap', () => {
    expect(() => midiToDrill(smf({ Piano: [[60, 0, 1], [64, 0, 1]] }))).toThrow(expect.objectContaining({ code: 'midi_overlap' }))
  })

  it('a legato overlap of a few ticks is trimmed, not refused', () => {
    const drill = midiToDrill(smf({ A: [[60, 0, 1.01], [62, 1, 1]] }))
    expect(drill.chords.map(c => c.notes.A)).toEqual(['C4', 'D4'])
    expect(drill.chords.map(c => c.beats)).toEqual([1, 1])
  })

  it.each([
    [new Uint8Array([1, 2, 3]), 'midi_unreadable'],
    [new TextEncoder().encode('{"title":"not midi"}'), 'midi_unreadable'],
    [new Uint8Array([0x4d, 0x54, 0x68, 0x64, 0, 0, 0, 6, 0, 1, 0, 1, 0x01, 0xe0, 0x4d, 0x54]), 'midi_unreadable'],
  ])('corrupt bytes are refused, not crashed on (%#)', (bytes, code) => {
    expect(() => midiToDrill(bytes)).toThrow(expect.objectContaining({ code }))
  })

  it('drum tracks are left out, and said so', () => {
    const warnings: string[] = []
    const drill = midiToDrill(smf({ Lead: [[60, 0, 1]], Kit: [[36, 0, 1], [38, 0, 1]] }, { channel: { Kit: 9 } }), { warnings })
    expect(drill.parts.map(p => p.name)).toEqual(['Lead'])
    expect(warnings[0]).toMatch(/drum track/)
  })

  it('an unreadable key signature falls back to C major with a warning, not a crash', () => {
    const m = new Midi()
    m.header.keySignatures.push({ ticks: 0, key: 'Eb', scale: 'major' }) // encoded out of range by the library
    m.addTrack().addNote({ midi: 61, ticks: 0, durationTicks: 480 })
    const warnings: string[] = []
    const drill = midiToDrill(m.toArray(), { warnings })
    expect(drill.key).toBe('C major')
    expect(drill.chords[0]!.notes[drill.parts[0]!.name]).toBe('C#4')
    expect(warnings[0]).toMatch(/key signature/)
  })

  it('duplicate or missing track names become distinct part names', () => {
    expect(midiToDrill(smf({ '': [[60, 0, 1]] })).parts[0]!.name).toMatch(/^Track \d+$/)
    const m = new Midi()
    for (const pitch of [60, 64]) {
      const t = m.addTrack()
      t.name = 'Horn'
      t.addNote({ midi: pitch, ticks: 0, durationTicks: 480 })
    }
    const drill = midiToDrill(m.toArray())
    expect(drill.parts.map(p => p.name)).toEqual(['Horn', 'Horn (2)'])
    expect(drill.chords[0]!.notes).toEqual({ 'Horn': 'C4', 'Horn (2)': 'E4' })
  })

  it('options set the title, key, instruments and reference pitch', () => {
    const drill = midiToDrill(smf({ Cornet: [[74, 0, 2]] }), { title: 'Warm-up', key: 'Bb major', a4: 442, instruments: { Cornet: 'cornet-bb' } })
    expect(drill).toMatchObject({ title: 'Warm-up', key: 'Bb major', a4: 442, parts: [{ name: 'Cornet', instrument: 'cornet-bb' }] })
  })
})
