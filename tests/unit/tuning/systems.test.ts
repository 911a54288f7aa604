import { describe, expect, it } from 'vitest'
import { SYSTEM_NAMES } from '../../../shared/drill/schema'
import { computeTargets, equalHz, meantoneFifth, Ratio, ratioCents, TuningError } from '../../../shared/tuning/index'
import type { TargetNote } from '../../../shared/tuning/index'
import { drillOf } from './helpers'

const byNote = (notes: TargetNote[]) => Object.fromEntries(notes.map(n => [n.note, n]))

describe('equal temperament', () => {
  it.each([440, 415, 442, 466])('every target is the equal-tempered frequency at A4 = %i Hz (MIDI Tuning Standard)', a4 => {
    const r = computeTargets(drillOf(['C3 G3 E4 C5', 'A2 E3 C4 A4']), { name: 'equal' }, a4)
    for (const c of r.chords) {
      for (const n of c.notes) {
        expect(n.targetHz).toBeCloseTo(a4 * 2 ** ((n.midi - 69) / 12), 9)
        expect(n.centsFromEqual).toBe(0)
      }
    }
    expect(r.driftCents).toBe(0)
  })

  it('reports the root and its octaves as exact ratios, other notes as irrational (null)', () => {
    const n = byNote(computeTargets(drillOf(['C3 G3 E4 C5']), { name: 'equal' }).chords[0]!.notes)
    expect(n.C3!.ratio).toBe('1/1')
    expect(n.C5!.ratio).toBe('4/1')
    expect(n.E4!.ratio).toBeNull()
  })
})

describe('just intonation from each chord root', () => {
  // Pure ratios above the root are the standard definitions; cents from equal = 1200·log2(ratio) − 100·semitones.
  it.each([
    ['C4 E4 G4', 'E4', '5/4', -13.686], // major 4:5:6 — common practice: just third 13.7 ¢ below equal
    ['C4 E4 G4', 'G4', '3/2', 1.955], // common practice: just fifth 2.0 ¢ above equal
    ['C3 G3 E5', 'E5', '5/1', -13.686], // a third two octaves up is 5/1 (the ratio is taken where the note sounds)
    ['E3 G3 C4', 'E3', '5/4', -13.686], // first inversion: ratio from the root C3 below the bass
    ['E3 G3 C4', 'C4', '2/1', 0],
    ['A3 C4 E4', 'C4', '6/5', 15.641], // minor 10:12:15
    ['A3 C4 E4', 'E4', '3/2', 1.955],
    ['B3 D4 F4', 'D4', '6/5', 15.641], // diminished: minor third 6/5
    ['B3 D4 F4', 'F4', '64/45', 9.776], // diminished fifth 64/45 (5-limit)
    ['C4 E4 G#4', 'G#4', '25/16', -27.373], // augmented fifth 25/16
    ['C4 E4 G4 B4', 'B4', '15/8', -11.731], // major seventh 15/8
    ['C4 E4 G4 A4', 'A4', '5/3', -15.641], // sixth 5/3
    ['C4 F4 G4', 'F4', '4/3', -1.955], // suspended fourth 4/3
    ['C4 D4 G4', 'D4', '9/8', 3.910], // suspended second 9/8
    ['C3 E3 G3 D4', 'D4', '9/4', 3.910], // ninth 9/4 (9/8 in the octave)
    ['D3 F3 A3 C4', 'C4', '9/5', 17.596], // minor seventh chord: 9/5 (10:12:15:18)
    ['B2 D3 F3 A3', 'A3', '16/9', -3.910], // half-diminished: 16/9 over the 64/45 fifth
    ['B2 D3 F3 Ab3', 'Ab3', '128/75', 25.418], // diminished seventh: 128/75 (three minor thirds 6/5·6/5·… in 5-limit)
  ])('%s: %s is %s (%f ¢ from equal)', (voicing, note, ratio, cents) => {
    const n = byNote(computeTargets(drillOf([voicing]), { name: 'just-root' }).chords[0]!.notes)[note]!
    expect(n.ratio).toBe(ratio)
    expect(n.centsFromEqual).toBeCloseTo(cents, 3)
    expect(n.targetHz).toBeCloseTo(n.equalHz * 2 ** (cents / 1200), 2)
  })

  it('puts the root on its equal-tempered frequency at the reference', () => {
    const r = computeTargets(drillOf(['G2 B3 D4 F4']), { name: 'just-root' }, 442)
    const g = byNote(r.chords[0]!.notes).G2!
    expect(g.targetHz).toBeCloseTo(442 * 2 ** ((43 - 69) / 12), 9)
    expect(g.centsFromEqual).toBe(0)
  })

  it.each([
    ['harmonic', '7/2', -31.174], // 4:5:6:7 (7/4 an octave up) — common practice: harmonic seventh 31.2 ¢ below equal
    ['5-limit', '32/9', -3.910], // 36:45:54:64 (16/9 an octave up)
  ] as const)('the dominant seventh with the %s option is %s above G2', (seventh, ratio, cents) => {
    const n = byNote(computeTargets(drillOf(['G2 B3 D4 F4']), { name: 'just-root', seventh }).chords[0]!.notes).F4!
    expect(n.ratio).toBe(ratio)
    expect(n.centsFromEqual).toBeCloseTo(cents, 3)
  })

  it('5:4:6 in Hz: C4 major triad at A4 = 440 (common practice, definition of the ratios)', () => {
    const n = byNote(computeTargets(drillOf(['C4 E4 G4']), { name: 'just-root' }).chords[0]!.notes)
    const c4 = equalHz('C4')
    expect(n.C4!.targetHz).toBeCloseTo(c4, 9)
    expect(n.E4!.targetHz).toBeCloseTo(c4 * 5 / 4, 9)
    expect(n.G4!.targetHz).toBeCloseTo(c4 * 3 / 2, 9)
  })

  it('an unnamed set falls back to equal temperament with a warning naming the chord', () => {
    const r = computeTargets(drillOf(['C4 Db4 D4']), { name: 'just-root' })
    expect(r.chords[0]!.notes.every(n => n.centsFromEqual === 0 && n.member === null && n.ratio === null)).toBe(true)
    expect(r.warnings).toEqual([expect.objectContaining({ code: 'unnamed_chord', chord: 0, message: expect.stringMatching(/^Chord 1: .*equal temperament/) })])
  })
})

describe('just intonation from the tonic (fixed 5-limit scale)', () => {
  it.each([
    ['C4', '1/1'], ['D4', '9/8'], ['E4', '5/4'], ['F4', '4/3'], ['G4', '3/2'], ['A4', '5/3'], ['B4', '15/8'],
  ])('C major: %s is %s above the tonic (5-limit major scale, common practice)', (note, ratio) => {
    const r = computeTargets(drillOf([{ notes: note, symbol: 'C' }]), { name: 'just-tonic' })
    const n = r.chords[0]!.notes[0]!
    const [num, den] = ratio.split('/').map(Number)
    expect(n.centsFromEqual).toBeCloseTo(ratioCents(num!, den!) - 100 * (n.midi - 60), 9)
  })

  it.each([
    ['C4', 0], ['D4', 3.910], ['Eb4', 15.641], ['F4', -1.955], ['G4', 1.955], ['Ab4', 13.686], ['Bb4', 17.596],
  ])('C minor: %s is %f ¢ from equal (5-limit minor scale 1, 9/8, 6/5, 4/3, 3/2, 8/5, 9/5)', (note, cents) => {
    const r = computeTargets(drillOf([note], { key: 'C minor' }), { name: 'just-tonic' })
    expect(r.chords[0]!.notes[0]!.centsFromEqual).toBeCloseTo(cents, 3)
  })

  it('the supertonic chord meets the comma: its fifth D–A is 40/27, 680.449 ¢, a syntonic comma narrow (common practice)', () => {
    const r = computeTargets(drillOf(['C3 G3 E4 C5', 'D3 A3 F4 D5']), { name: 'just-tonic' })
    const ii = byNote(r.chords[1]!.notes)
    expect(ii.A3!.ratio).toBe('40/27')
    expect(ratioCents(40, 27)).toBeCloseTo(680.449, 3) // 1200·log2(40/27)
    expect(ratioCents(3, 2) - ratioCents(40, 27)).toBeCloseTo(21.506, 3) // the syntonic comma
    const fifth = r.warnings.find(w => w.code === 'comma' && /fifth/.test(w.message))
    expect(fifth).toMatchObject({ chord: 1 })
    expect(fifth!.message).toMatch(/Chord 2.*D–A is 40\/27 \(680\.449 ¢\), a syntonic comma \(81\/80, 21\.506 ¢\) narrower than pure 3\/2/)
    // D–F is 32/27, a comma narrower than 6/5 as well; the tonic chord has no warning.
    expect(r.warnings.filter(w => w.chord === 1).map(w => w.message).join('\n')).toMatch(/D–F is 32\/27/)
    expect(r.warnings.filter(w => w.chord === 0)).toEqual([])
  })

  it('places the tonic on its equal-tempered frequency at the reference pitch', () => {
    const r = computeTargets(drillOf(['Eb4 G4 Bb4'], { key: 'Eb major' }), { name: 'just-tonic' }, 442)
    expect(byNote(r.chords[0]!.notes).Eb4!.targetHz).toBeCloseTo(442 * 2 ** ((63 - 69) / 12), 9)
  })

  it('the tonic option moves the scale', () => {
    const r = computeTargets(drillOf(['G3 B3 D4']), { name: 'just-tonic', tonic: 'G' })
    expect(byNote(r.chords[0]!.notes).G3!.centsFromEqual).toBe(0)
    expect(byNote(r.chords[0]!.notes).B3!.centsFromEqual).toBeCloseTo(-13.686, 3)
  })
})

describe('just intonation with common tones held (the comma pump)', () => {
  // SATB voicings of I–vi–ii–V–I in C; the common tones keep their pitch from chord to chord.
  const pump = drillOf(['C3 G3 E4 C5', 'A2 A3 E4 C5', 'D3 A3 F4 D5', 'G2 B3 D4 D5', 'C3 G3 E4 C5'])

  it('I–vi–ii–V–I drifts down by one syntonic comma, −21.506 ¢ (common practice; 81/80 = 21.506 ¢)', () => {
    const r = computeTargets(pump, { name: 'just-common' })
    expect(r.driftCents).toBeCloseTo(-ratioCents(81, 80), 9)
    expect(r.driftCents).toBeCloseTo(-21.506, 3)
    expect(r.chords.map(c => c.centreCents)).toEqual([0, expect.closeTo(0, 9), expect.closeTo(-21.506, 3), expect.closeTo(-21.506, 3), expect.closeTo(-21.506, 3)])
    // The final tonic sits a comma below the first one, in Hz as well.
    const firstC = byNote(r.chords[0]!.notes).C3!.targetHz
    const lastC = byNote(r.chords[4]!.notes).C3!.targetHz
    expect(lastC / firstC).toBeCloseTo(80 / 81, 12)
  })

  it('held notes keep their frequency from chord to chord', () => {
    const r = computeTargets(pump, { name: 'just-common' })
    const hz = (ci: number, note: string) => byNote(r.chords[ci]!.notes)[note]!.targetHz
    expect(hz(1, 'C5')).toBeCloseTo(hz(0, 'C5'), 9) // C held into vi
    expect(hz(1, 'E4')).toBeCloseTo(hz(0, 'E4'), 9) // E held into vi
    expect(hz(2, 'A3')).toBeCloseTo(hz(1, 'A3'), 9) // A held into ii
    expect(hz(3, 'D5')).toBeCloseTo(hz(2, 'D5'), 9) // D held into V
    expect(hz(4, 'G3') * 2).toBeCloseTo(hz(3, 'G2') * 4, 6) // G held into I (octave-adjusted)
  })

  it('every chord is pure around its root', () => {
    const r = computeTargets(pump, { name: 'just-common' })
    for (const c of r.chords) {
      const root = c.notes.find(n => n.member === 'root')!
      for (const n of c.notes) {
        const [num, den] = n.ratio!.split('/').map(Number)
        const [rn, rd] = root.ratio!.split('/').map(Number)
        expect(n.targetHz / root.targetHz).toBeCloseTo((num! / den!) / (rn! / rd!), 9)
      }
    }
  })

  it('the first chord is tuned as in just-root', () => {
    const common = computeTargets(pump, { name: 'just-common' }).chords[0]!.notes
    const root = computeTargets(pump, { name: 'just-root' }).chords[0]!.notes
    expect(common.map(n => n.targetHz)).toEqual(root.map(n => n.targetHz))
  })

  it('a chord with no common tone keeps the pitch centre the progression has reached', () => {
    // C → Dm (shares nothing with C: D F A) → … the centre stays where it was.
    const r = computeTargets(drillOf(['C3 E3 G3', 'D3 F3 A3']), { name: 'just-common' })
    expect(r.chords[1]!.centreCents).toBeCloseTo(0, 9)
    // D sits at 9/8 of the tonic in the key's 5-limit scale: +3.910 ¢.
    expect(byNote(r.chords[1]!.notes).D3!.centsFromEqual).toBeCloseTo(3.910, 3)
  })

  it('after the pump, a chord with no common tone stays a comma low', () => {
    const r = computeTargets(drillOf(['C3 G3 E4 C5', 'A2 A3 E4 C5', 'D3 A3 F4 D5', 'G2 B3 D4 D5', 'C3 G3 E4 C5', 'D3 F#3 A3 -']), { name: 'just-common' })
    expect(r.chords[5]!.centreCents).toBeCloseTo(-21.506, 3)
  })

  it('held notes that cannot both stay share the move and the tool says so', () => {
    // Dm → G7 (5-limit): D–F is 6/5 in Dm but 32/27 in G7, so D and F cannot both be held.
    const r = computeTargets(drillOf(['D3 F3 A3', 'G2 D3 F3 B3']), { name: 'just-common', seventh: '5-limit' })
    const w = r.warnings.find(x => x.code === 'held_moved')
    expect(w).toMatchObject({ chord: 1 })
    expect(w!.message).toMatch(/D \+10\.753 ¢, F −10\.753 ¢/) // half the syntonic comma each way
  })

  it('rests and unnamed chords never produce NaN', () => {
    const r = computeTargets(drillOf(['C3 E3 G3', '- - -', 'C3 Db3 D3', 'F3 A3 C4']), { name: 'just-common' })
    for (const c of r.chords) for (const n of c.notes) expect(Number.isFinite(n.targetHz)).toBe(true)
    expect(r.chords[1]!.notes).toEqual([])
    expect(Number.isFinite(r.driftCents)).toBe(true)
  })
})

describe('Pythagorean tuning', () => {
  const scale = drillOf(['C4', 'D4', 'E4', 'F4', 'G4', 'A4', 'B4', 'F#4', 'G#4', 'Eb4', 'Bb4', 'C#4'])
  it.each([
    ['D4', 3.910], // 9/8 (two fifths)
    ['E4', 7.820], // 81/64, the Pythagorean ditone, 407.820 ¢
    ['F4', -1.955], // 4/3
    ['G4', 1.955], // 3/2
    ['A4', 5.865], // 27/16
    ['B4', 9.775], // 243/128
    ['F#4', 11.730], // 729/512
    ['G#4', 15.640], // 6561/4096 (eight fifths up)
    ['Eb4', -5.865], // 32/27 (three fifths down)
    ['Bb4', -3.910], // 16/9
  ])('C major, default chain E♭…G♯: %s is %f ¢ from equal (n·1.955 ¢ for n fifths, definition)', (note, cents) => {
    const r = computeTargets(scale, { name: 'pythagorean' })
    const n = r.chords.flatMap(c => c.notes).find(x => x.note === note)!
    expect(n.centsFromEqual).toBeCloseTo(cents, 3)
  })

  it('the major third is 81/64 = 407.820 ¢, a syntonic comma wide of 5/4 (definition)', () => {
    const n = byNote(computeTargets(drillOf(['C4 E4 G4']), { name: 'pythagorean' }).chords[0]!.notes)
    expect(n.E4!.ratio).toBe('81/64')
    expect(ratioCents(81, 64)).toBeCloseTo(407.820, 3)
  })

  it('the wolf fifth G♯–E♭ is 678.495 ¢ (seven octaves less eleven pure fifths, definition)', () => {
    const r = computeTargets(drillOf(['G#3 Eb4']), { name: 'pythagorean' })
    const n = byNote(r.chords[0]!.notes)
    const wolf = 1200 * Math.log2(n.Eb4!.targetHz / n['G#3']!.targetHz)
    expect(wolf).toBeCloseTo(678.495, 3)
    expect(7 * 1200 - 11 * ratioCents(3, 2)).toBeCloseTo(678.495, 3)
    expect(r.warnings).toEqual([expect.objectContaining({ code: 'wolf', message: expect.stringMatching(/G♯–E♭ is the wolf fifth \(678\.495 ¢/) })])
  })

  it.each([
    [{ wolf: 'F#' }, 'F#3', 'C#4'], // wolf placed on F♯–C♯
    [{ start: 'C' }, 'F3', 'C4'], // chain from C: the wolf lands on E♯(F)–C
    [{ start: 'Ab', wolf: 'C#' }, 'C#4', 'Ab4'],
  ])('the wolf goes where the director says: %j puts it on %s–%s', (opts, lo, hi) => {
    const r = computeTargets(drillOf([`${lo} ${hi}`]), { name: 'pythagorean', ...opts })
    const n = r.chords[0]!.notes
    expect(1200 * Math.log2(n[1]!.targetHz / n[0]!.targetHz)).toBeCloseTo(678.495, 3)
    // …and every other fifth is pure.
    const fifths = computeTargets(drillOf(['C4 G4', 'G3 D4', 'D4 A4', 'A3 E4', 'E4 B4', 'Bb3 F4', 'Eb4 Bb4']), { name: 'pythagorean', ...opts })
    for (const c of fifths.chords) {
      const size = 1200 * Math.log2(c.notes[1]!.targetHz / c.notes[0]!.targetHz)
      if (Math.abs(size - 678.495) > 0.01) expect(size).toBeCloseTo(701.955, 3)
    }
  })

  it.each([
    ['C major', ['C3 E3 G3', 'F3 A3 C4', 'G3 B3 D4 F4', 'A3 C4 E4', 'D3 F3 A3', 'E3 G3 B3', 'Bb2 D3 F3', 'E3 G#3 B3']],
    ['C minor', ['C3 Eb3 G3', 'F3 Ab3 C4', 'G3 B3 D4 F4', 'Ab2 C3 Eb3', 'Bb2 D3 F3', 'Eb3 G3 Bb3', 'D3 F3 Ab3', 'D3 F#3 A3']],
  ])('by default the wolf stays out of the chords of %s', (key, voicings) => {
    const r = computeTargets(drillOf(voicings, { key }), { name: 'pythagorean' })
    expect(r.warnings.filter(w => w.code === 'wolf')).toEqual([])
    const m = computeTargets(drillOf(voicings, { key }), { name: 'meantone' })
    expect(m.warnings.filter(w => w.code === 'wolf')).toEqual([])
  })

  it('the tonic sits on its equal-tempered frequency', () => {
    const r = computeTargets(drillOf(['F3 A3 C4'], { key: 'F major' }), { name: 'pythagorean' }, 415)
    expect(byNote(r.chords[0]!.notes).F3!.targetHz).toBeCloseTo(415 * 2 ** ((53 - 69) / 12), 9)
  })
})

describe('meantone', () => {
  it.each([
    ['1/4', 696.578], // quarter-comma fifth = 3/2 ÷ (81/80)^(1/4) = 696.578 ¢ (definition)
    ['1/3', 694.786], // third-comma: 701.955 − 21.506/3
    ['1/5', 697.654], // fifth-comma: 701.955 − 21.506/5
    ['1/6', 698.371], // sixth-comma: 701.955 − 21.506/6
    [0.2, 697.654],
  ])('a %s-comma fifth is %f ¢', (fraction, cents) => {
    const r = computeTargets(drillOf(['C4 G4']), { name: 'meantone', fraction })
    const n = r.chords[0]!.notes
    expect(1200 * Math.log2(n[1]!.targetHz / n[0]!.targetHz)).toBeCloseTo(cents, 3)
  })

  it('quarter-comma: four fifths make a pure major third, exactly 5/4 (definition of quarter-comma meantone)', () => {
    const r = computeTargets(drillOf(['C4 E4 G4']), { name: 'meantone' })
    const n = byNote(r.chords[0]!.notes)
    expect(n.E4!.ratio).toBe('5/4')
    expect(n.E4!.centsFromEqual).toBeCloseTo(-13.686, 3)
    expect(4 * meantoneFifth(new Ratio(1n, 4n)) - 2400).toBeCloseTo(386.314, 3)
    expect(n.G4!.ratio).toBeNull() // the tempered fifth is irrational
  })

  it('quarter-comma wolf G♯–E♭ is 737.637 ¢ (8400 − 11·696.578, definition)', () => {
    const r = computeTargets(drillOf(['G#3 Eb4']), { name: 'meantone' })
    const n = r.chords[0]!.notes
    expect(1200 * Math.log2(n[1]!.targetHz / n[0]!.targetHz)).toBeCloseTo(737.637, 3)
    expect(r.warnings[0]).toMatchObject({ code: 'wolf' })
  })

  it('the tonic sits on its equal-tempered frequency, the other notes tempered around it', () => {
    const r = computeTargets(drillOf(['Bb2 D3 F3'], { key: 'Bb major' }), { name: 'meantone', fraction: '1/6' }, 466)
    const n = byNote(r.chords[0]!.notes)
    expect(n.Bb2!.targetHz).toBeCloseTo(466 * 2 ** ((46 - 69) / 12), 9)
    expect(n.F3!.centsFromEqual).toBeCloseTo(698.371 - 700, 3) // one sixth-comma fifth above the tonic
  })

  it.each(['0/4', '5/4'])('refuses the fraction %s with the field named', fraction => {
    expect(() => computeTargets(drillOf(['C4']), { name: 'meantone', fraction })).toThrow(expect.objectContaining({ path: 'system.fraction' }))
  })
})

describe('never NaN, always a clear error', () => {
  const wide = drillOf(['C2 G2 E3 Bb3 D4', 'F2 C3 A3 Eb4 G4', 'B1 F#2 D#3 A3 C#4', 'Ebb3 Gb3 Bbb3 - -', 'C4 Db4 D4 Eb4 E4'])
  const scala = '! t\nTest\n 12\n 100.\n 200.\n 300.\n 400.\n 500.\n 600.\n 700.\n 800.\n 900.\n 1000.\n 1100.\n 2/1\n'
  it.each(SYSTEM_NAMES.flatMap(s => [415, 440, 466].map(a4 => [s, a4] as const)))('%s at %i Hz gives finite targets', (name, a4) => {
    const r = computeTargets(wide, { name, ...(name === 'scala' ? { scala } : {}) }, a4)
    for (const c of r.chords) {
      for (const n of c.notes) {
        expect(Number.isFinite(n.targetHz) && n.targetHz > 0).toBe(true)
        expect(Number.isFinite(n.centsFromEqual)).toBe(true)
        expect(Number.isFinite(n.equalHz)).toBe(true)
      }
      expect(Number.isFinite(c.centreCents)).toBe(true)
    }
  })

  it.each([[414], [467], [Number.NaN]])('a reference of %f Hz is refused', a4 => {
    expect(() => computeTargets(drillOf(['C4']), { name: 'equal' }, a4)).toThrow(expect.objectContaining({ code: 'a4_out_of_range' }))
  })

  it('an unknown note name names the chord and part', () => {
    expect(() => computeTargets(drillOf(['C4 H4']))).toThrow(expect.objectContaining({ code: 'invalid_drill', path: 'chords.0.notes.P2' }))
  })

  it('the scala system without a file names the field', () => {
    expect(() => computeTargets(drillOf(['C4']), { name: 'scala' })).toThrow(expect.objectContaining({ path: 'system.scala' }))
  })

  it('an unknown system name is refused', () => {
    expect(() => computeTargets(drillOf(['C4']), { name: 'werckmeister' as never })).toThrow(TuningError)
  })
})
