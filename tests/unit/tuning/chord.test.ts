import { describe, expect, it } from 'vitest'
import { analyzeChord, parseNote } from '../../../shared/tuning/index'

const notes = (s: string) => s.split(/\s+/).map(n => parseNote(n))
const members = (s: string, symbol?: string) => {
  const a = analyzeChord(notes(s), symbol)
  return { root: a.root?.pc ?? null, quality: a.quality, members: a.roles.map(r => r.member).join(' '), warnings: a.warnings.map(w => w.code) }
}

// Chord spelling, inversions and doubling are common practice (any harmony primer).
describe('chord members from the sounding notes', () => {
  it.each([
    ['C3 G3 E4 C5', undefined, 'C', 'major', 'root fifth third root'],
    ['E3 G3 C4', undefined, 'C', 'major', 'third fifth root'], // first inversion: the bass is not the root
    ['G2 C4 E4', undefined, 'C', 'major', 'fifth root third'], // second inversion
    ['A2 E3 C4 A4', undefined, 'A', 'minor', 'root fifth third root'],
    ['B3 D4 F4', undefined, 'B', 'diminished', 'root third fifth'],
    ['C4 E4 G#4', undefined, 'C', 'augmented', 'root third fifth'],
    ['G2 B3 D4 F4', undefined, 'G', 'dominant-seventh', 'root third fifth seventh'],
    ['B2 G3 D4 F4', undefined, 'G', 'dominant-seventh', 'third root fifth seventh'], // G7 in first inversion
    ['F2 G3 B3 D4', undefined, 'G', 'dominant-seventh', 'seventh root third fifth'], // third inversion
    ['C3 E3 G3 B3', undefined, 'C', 'major-seventh', 'root third fifth seventh'],
    ['D3 F3 A3 C4', undefined, 'D', 'minor-seventh', 'root third fifth seventh'],
    ['B2 D3 F3 A3', undefined, 'B', 'half-diminished-seventh', 'root third fifth seventh'],
    ['B2 D3 F3 Ab3', undefined, 'B', 'diminished-seventh', 'root third fifth seventh'],
    ['C3 F3 G3', undefined, 'C', 'suspended-fourth', 'root fourth fifth'],
    ['C3 D3 G3', undefined, 'C', 'suspended-second', 'root second fifth'],
    ['C3 E3 G3 D4', undefined, 'C', 'major-added-ninth', 'root third fifth ninth'],
    ['C3 E3 G3 Bb3 D4', undefined, 'C', 'dominant-ninth', 'root third fifth seventh ninth'],
    ['G2 D3 G3', undefined, 'G', 'fifth', 'root fifth root'], // open fifth
    ['Bb2 F3 D4', undefined, 'Bb', 'major', 'root fifth third'],
    ['F#3 A#3 C#4', undefined, 'F#', 'major', 'root third fifth'],
    ['C4 C5', undefined, 'C', 'unison', 'root root'],
    ['E4', undefined, 'E', 'unison', 'root'],
    ['E3 C4', undefined, 'C', 'major', 'third root'], // a bare sixth implies the chord of its upper note
    ['A3 C4', undefined, 'A', 'minor', 'root third'],
  ])('%s (%s) → root %s, %s: %s', (voicing, symbol, root, quality, m) => {
    const got = members(voicing, symbol)
    expect(got.root).toBe(root)
    expect(got.quality).toBe(quality)
    expect(got.members).toBe(m)
    expect(got.warnings).toEqual([])
  })

  it('without a symbol the bass settles C6 against Am7 (common practice)', () => {
    expect(members('C3 E3 G3 A3')).toMatchObject({ root: 'C', quality: 'major-sixth', members: 'root third fifth sixth' })
    expect(members('A2 C3 E3 G3')).toMatchObject({ root: 'A', quality: 'minor-seventh', members: 'root third fifth seventh' })
  })

  it('a symbol settles the same set the other way', () => {
    expect(members('C3 E3 G3 A3', 'Am7')).toMatchObject({ root: 'A', quality: 'minor-seventh', members: 'third fifth seventh root' })
    expect(members('A2 C3 E3 G3', 'C6')).toMatchObject({ root: 'C', quality: 'major-sixth', members: 'sixth root third fifth' })
  })

  it.each([
    ['B2 D3 G3', 'G/B', 'G'],
    ['B2 D3 G3 F4', 'G7/B', 'G'],
    ['A#2 D3 F3', 'Bb', 'Bb'], // enharmonic spelling in the notes does not hide the member
    ['C3 Eb3 Gb3 Bb3', 'Cø', 'C'],
    ['C3 Eb3 G3', 'C-', 'C'],
  ])('symbol %s reads as root %s', (voicing, symbol, root) => {
    const a = analyzeChord(notes(voicing), symbol)
    expect(a.root?.pc).toBe(root)
    expect(a.warnings).toEqual([])
  })

  it('a note outside the symbol is an added tone, with a warning', () => {
    const got = members('C3 E3 G3 D4', 'C')
    expect(got.members).toBe('root third fifth added')
    expect(got.warnings).toEqual(['symbol_mismatch'])
  })

  it('an unreadable symbol falls back to the notes, with a warning', () => {
    const got = members('C3 E3 G3', 'Cxyz')
    expect(got.root).toBe('C')
    expect(got.warnings).toEqual(['unknown_symbol'])
  })

  it.each(['C4 Db4 D4', 'C4 F#4', 'C4 D4', 'C4 Db4 G4 Ab4'])('%s cannot be named: clear message, no members', voicing => {
    const a = analyzeChord(notes(voicing))
    expect(a.root).toBeNull()
    expect(a.roles.every(r => r.member === null)).toBe(true)
    expect(a.warnings).toEqual([expect.objectContaining({ code: 'unnamed_chord', message: expect.stringMatching(/cannot be named as a chord/) })])
  })

  it('the root reference is the root in the octave at or below the bass', () => {
    expect(analyzeChord(notes('E3 G3 C4')).rootRefMidi).toBe(48) // C3
    expect(analyzeChord(notes('C3 E3 G3')).rootRefMidi).toBe(48)
  })
})
