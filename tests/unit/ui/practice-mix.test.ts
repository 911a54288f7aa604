// What the practice tones play for each mix of parts, a looped chord, and the drone pitches.
import { describe, expect, it } from 'vitest'
import { computeTargets } from '../../../shared/tuning/index'
import { chordTones, drillEvents, loopEvents, OWN_PART_WEIGHT, rootDroneHz, tonicDroneHz } from '../../../shared/practice/mix'

// C major then G7 over B (rootless), tuned just from each chord's root at A4 = 440 Hz.
const targets = computeTargets({
  title: 'Mix',
  key: 'C major',
  tempo: 90,
  system: { name: 'just-root' },
  parts: [{ name: 'Soprano' }, { name: 'Alto' }, { name: 'Bass' }],
  chords: [
    { beats: 3, notes: { Soprano: 'E5', Alto: 'G4', Bass: 'C3' } },
    { beats: 1, symbol: 'G7', notes: { Soprano: 'F5', Alto: 'D4', Bass: 'B2' } },
  ],
})
const [c1, c2] = targets.chords as [typeof targets.chords[0], typeof targets.chords[0]]
const hzOf = (part: string) => c1.notes.find(n => n.part === part)!.targetHz

describe('mixes of parts', () => {
  it('plays every part, mine louder, the others without me, or mine alone', () => {
    expect(chordTones(c1, 'all', 'Alto').hz).toEqual(c1.notes.map(n => n.targetHz))
    const withMe = chordTones(c1, 'with-me', 'Alto')
    expect(withMe.hz).toHaveLength(3)
    expect(withMe.weights[withMe.hz.indexOf(hzOf('Alto'))]).toBe(OWN_PART_WEIGHT)
    expect(withMe.weights.filter(w => w === 1)).toHaveLength(2)
    expect(chordTones(c1, 'without-me', 'Alto').hz.sort()).toEqual([hzOf('Soprano'), hzOf('Bass')].sort())
    expect(chordTones(c1, 'mine', 'Alto').hz).toEqual([hzOf('Alto')])
  })

  it('places the chords on the tempo and leaves a short gap to re-sound repeated notes', () => {
    const ev = drillEvents(targets.chords, 90, 'all', null)
    // 90 beats per minute: a beat lasts 60/90 s; chord 2 starts after 3 beats, at 2 s.
    expect(ev.map(e => e.atS)).toEqual([0, 2])
    expect(ev[0]!.durationS).toBeCloseTo(2 - 0.08, 9)
  })

  it('loops one chord for its length, at least a second', () => {
    expect(loopEvents(c1, 90, 'all', null).periodS).toBeCloseTo(2, 9)
    expect(loopEvents(c2, 90, 'all', null).periodS).toBe(1) // 1 beat = 0.667 s, held for a second
  })
})

describe('drones', () => {
  it('puts the tonic drone at its equal-tempered place, between G2 and G3', () => {
    // Equal temperament, f = A4 · 2^((m − 69)/12) (common practice): at A4 = 440 Hz C3 = 130.813 Hz,
    // E♭3 = 155.563 Hz; at A4 = 415 Hz every pitch scales by 415/440, C3 = 123.380 Hz.
    expect(tonicDroneHz('C major', 440)).toBeCloseTo(130.813, 2)
    expect(tonicDroneHz('Eb major', 440)).toBeCloseTo(155.563, 2)
    expect(tonicDroneHz('C major', 415)).toBeCloseTo(123.380, 2)
    expect(tonicDroneHz('H major', 440)).toBeNull()
  })

  it('drones on the chord root at the root\'s own target, so it agrees with the chord', () => {
    // The root of a just chord tuned from its root sits at its equal-tempered place: C3 = 130.813 Hz.
    expect(rootDroneHz(c1, 440)).toBeCloseTo(130.813, 2)
    // G7 over B (symbol given; B–D–F alone reads as B diminished): the root G is not sounded; the drone takes G at its equal-tempered place, G2 = 97.999 Hz.
    expect(rootDroneHz(c2, 440)).toBeCloseTo(97.999, 2)
  })
})
