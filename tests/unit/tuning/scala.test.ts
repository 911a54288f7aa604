import { readFileSync } from 'node:fs'
import { fileURLToPath } from 'node:url'
import { describe, expect, it } from 'vitest'
import { computeTargets, parseScala, ratioCents, systemToScala, toScala, TuningError } from '../../../shared/tuning/index'
import { drillOf } from './helpers'

const fixture = (name: string) => readFileSync(fileURLToPath(new URL(`../../fixtures/scala/${name}`, import.meta.url)), 'utf8')

// The fixtures follow the published Scala .scl format: '!' comment lines, a description line (may be
// empty), the number of pitches, then one pitch per line — with a '.' it is cents, otherwise a ratio
// (a whole number n means n/1); anything after the value on its line is ignored; 1/1 is implied.
describe('reading Scala files', () => {
  it('quarter-comma meantone (values as in the format\'s published example, from memory) matches our meantone', () => {
    const scale = parseScala(fixture('quarter-comma-meantone.scl'))
    expect(scale.description).toMatch(/^Quarter-comma meantone/)
    expect(scale.degrees).toHaveLength(12)
    expect(scale.degrees[3]).toMatchObject({ ratio: expect.objectContaining({ n: 5n, d: 4n }) })
    expect(scale.degrees[0]!.ratio).toBeNull()
    expect(scale.degrees[0]!.cents).toBe(76.049)
    // The file's cents equal 1/4-comma meantone computed from the definition to the file's 5 decimals.
    const r = computeTargets(drillOf(['C4', 'C#4', 'D4', 'Eb4', 'E4', 'F4', 'F#4', 'G4', 'G#4', 'A4', 'Bb4', 'B4']), { name: 'meantone' })
    r.chords.forEach((c, k) => {
      const fromFile = k === 0 ? 0 : scale.degrees[k - 1]!.cents
      expect(100 * k + c.notes[0]!.centsFromEqual).toBeCloseTo(fromFile, 4)
    })
  })

  it('a ratio-only file keeps exact ratios', () => {
    const scale = parseScala(fixture('just-major-chromatic.scl'))
    expect(scale.degrees.map(d => d.ratio?.toString())).toEqual(['16/15', '9/8', '6/5', '5/4', '4/3', '45/32', '3/2', '8/5', '5/3', '16/9', '15/8', '2/1'])
    expect(scale.degrees[3]!.cents).toBeCloseTo(386.314, 3) // 5/4 (definition)
  })

  it('labels after values, comments between values, whole-number ratios and cents with a period', () => {
    const scale = parseScala(fixture('labelled-values.scl'))
    expect(scale.description).toBe('Pentatonic with labels and comments')
    expect(scale.degrees.map(d => d.ratio?.toString() ?? d.cents)).toEqual(['9/8', '5/4', 701.955, '5/3', '2/1'])
  })

  it('an empty description line is allowed', () => {
    const scale = parseScala(fixture('empty-description.scl'))
    expect(scale.description).toBe('')
    expect(scale.degrees).toHaveLength(1)
  })

  it('accepts CRLF line ends, a byte-order mark and "100." or "-5.0" cents', () => {
    const scale = parseScala('\uFEFF! x\r\nTest\r\n 3\r\n 100.\r\n -5.0\r\n 2/1\r\n')
    expect(scale.degrees.map(d => d.cents)).toEqual([100, -5, 1200])
  })

  it.each([
    ['no-count.scl', /line 3: the number of pitches is missing/],
    ['bad-count.scl', /line 4: expected the number of pitches \(a whole number\), found "twelve"/],
    ['bad-value.scl', /line 7: "five-fourths" is not a ratio/],
    ['negative-ratio.scl', /line 6: "-3\/2" is not a positive ratio/],
    ['zero-ratio.scl', /line 6: "0\/2" is not a positive ratio/],
    ['zero-denominator.scl', /line 6: "3\/0" is not a positive ratio/],
    ['too-few.scl', /line 4 declares 5 pitches but only 3 follow/],
    ['bad-cents.scl', /line 6: "701\.9\.55" is not a cents value/],
    ['empty.scl', /line 1: the number of pitches is missing/],
  ])('%s is refused with the line named: %s', (file, message) => {
    let err: unknown
    try { parseScala(fixture(`bad/${file}`)) } catch (e) { err = e }
    expect(err).toBeInstanceOf(TuningError)
    expect((err as TuningError).code).toBe('bad_scala')
    expect((err as TuningError).message).toMatch(message)
    expect((err as TuningError).path).toMatch(/^line \d+$/)
  })

  it('a bad file inside a drill names the field and the line', () => {
    expect(() => computeTargets(drillOf(['C4']), { name: 'scala', scala: fixture('bad/negative-ratio.scl') }))
      .toThrow(expect.objectContaining({ path: 'system.scala', message: expect.stringMatching(/line 6/) }))
  })
})

describe('the scala system', () => {
  it('maps a 12-pitch scale key by key onto the tonic, tonic at its equal-tempered frequency', () => {
    const scala = fixture('just-major-chromatic.scl')
    const r = computeTargets(drillOf(['D4 F#4 A4'], { key: 'D major' }), { name: 'scala', scala }, 442)
    const [d, fs, a] = r.chords[0]!.notes
    expect(d!.targetHz).toBeCloseTo(442 * 2 ** ((62 - 69) / 12), 9)
    expect(fs!.targetHz / d!.targetHz).toBeCloseTo(5 / 4, 12)
    expect(a!.targetHz / d!.targetHz).toBeCloseTo(3 / 2, 12)
    expect(fs!.ratio).toBe('5/4')
  })

  it('maps other scales to the nearest degree within 50 ¢ (19 equal)', () => {
    const r = computeTargets(drillOf(['C4 E4 G4']), { name: 'scala', scala: fixture('equal-19.scl') })
    const [, e, g] = r.chords[0]!.notes
    expect(e!.centsFromEqual).toBeCloseTo(378.94737 - 400, 4) // degree 6 of 19
    expect(g!.centsFromEqual).toBeCloseTo(694.73684 - 700, 4) // degree 11 of 19
  })

  it('repeats at the file\'s period (a twelfth, 3/1)', () => {
    const r = computeTargets(drillOf(['C4 G5']), { name: 'scala', scala: fixture('tritave-9.scl') })
    const [c, g] = r.chords[0]!.notes
    expect(g!.targetHz / c!.targetHz).toBeCloseTo(3, 12)
    expect(g!.ratio).toBe('3/1')
  })

  it('a note with no degree within 50 ¢ falls back to equal temperament with a warning', () => {
    const r = computeTargets(drillOf(['C4 F#4']), { name: 'scala', scala: fixture('labelled-values.scl') })
    expect(r.chords[0]!.notes[1]!.centsFromEqual).toBe(0)
    expect(r.warnings).toContainEqual(expect.objectContaining({ code: 'not_in_scale', message: expect.stringMatching(/F♯4/) }))
  })
})

describe('writing Scala files', () => {
  it.each([
    'quarter-comma-meantone.scl', 'just-major-chromatic.scl', 'labelled-values.scl', 'equal-19.scl', 'tritave-9.scl', 'empty-description.scl',
  ])('%s survives a round trip', file => {
    const a = parseScala(fixture(file))
    const b = parseScala(toScala(a, file))
    expect(b.description).toBe(a.description)
    expect(b.degrees.map(d => d.ratio?.toString() ?? null)).toEqual(a.degrees.map(d => d.ratio?.toString() ?? null))
    b.degrees.forEach((d, i) => expect(d.cents).toBeCloseTo(a.degrees[i]!.cents, 5))
  })

  it('exports quarter-comma meantone as the format\'s published example lists it (from memory)', () => {
    const ours = parseScala(systemToScala({ name: 'meantone' }))
    const example = parseScala(fixture('quarter-comma-meantone.scl'))
    ours.degrees.forEach((d, i) => expect(d.cents).toBeCloseTo(example.degrees[i]!.cents, 4))
    expect(ours.degrees[3]!.ratio?.toString()).toBe('5/4')
    expect(ours.degrees[7]!.ratio?.toString()).toBe('25/16')
  })

  it.each([
    [{ name: 'equal' as const }, 5, 500],
    [{ name: 'pythagorean' as const }, 7, ratioCents(3, 2)],
    [{ name: 'just-tonic' as const }, 4, ratioCents(5, 4)],
    [{ name: 'just-root' as const }, 10, ratioCents(7, 4)],
    [{ name: 'just-root' as const, seventh: '5-limit' as const }, 10, ratioCents(16, 9)],
    [{ name: 'meantone' as const, fraction: '1/6' }, 7, ratioCents(3, 2) - ratioCents(81, 80) / 6],
  ])('exports %j: degree %i is %f ¢', (system, degree, cents) => {
    const text = systemToScala(system)
    const scale = parseScala(text)
    expect(scale.degrees).toHaveLength(12)
    expect(scale.degrees[11]!.ratio?.toString()).toBe('2/1')
    expect(scale.degrees[degree - 1]!.cents).toBeCloseTo(cents, 5)
    expect(text.split('\n')[1]).toBe(' 12')
  })

  it('cents values are written with a period so they read back as cents', () => {
    const text = systemToScala({ name: 'equal' })
    expect(text).toMatch(/^ 100\.000000$/m)
  })
})
