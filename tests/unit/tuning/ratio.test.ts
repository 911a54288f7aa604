import { describe, expect, it } from 'vitest'
import { commaName, COMMAS, Ratio, ratioCents, toRatio, TuningError } from '../../../shared/tuning/index'

describe('commas and intervals (standard definitions; size = 1200·log2(ratio))', () => {
  it.each([
    ['syntonic comma 81/80', COMMAS.syntonic, 21.506],
    ['Pythagorean comma 3^12/2^19', COMMAS.pythagorean, 23.460],
    ['schisma 32805/32768', COMMAS.schisma, 1.954],
    ['lesser diesis 128/125', COMMAS.lesserDiesis, 41.059],
    ['septimal comma 64/63', COMMAS.septimal, 27.264],
    ['diaschisma 2048/2025', COMMAS.diaschisma, 19.553],
    ['greater diesis 648/625', COMMAS.greaterDiesis, 62.565],
  ])('%s = %f ¢', (_, ratio, cents) => {
    expect(ratio.cents()).toBeCloseTo(cents, 3)
  })

  it.each([
    [5, 4, 386.314], // just major third (definition)
    [6, 5, 315.641], // just minor third
    [3, 2, 701.955], // just fifth
    [7, 4, 968.826], // harmonic seventh
    [4, 3, 498.045], // just fourth
    [9, 8, 203.910], // major whole tone
    [10, 9, 182.404], // minor whole tone
    [16, 15, 111.731], // diatonic semitone
    [2, 1, 1200], // octave
  ])('%i/%i = %f ¢', (n, d, cents) => {
    expect(ratioCents(n, d)).toBeCloseTo(cents, 3)
    expect(new Ratio(n, d).cents()).toBeCloseTo(cents, 3)
  })

  it('twelve pure fifths exceed seven octaves by the Pythagorean comma (definition)', () => {
    const twelveFifths = new Ratio(3n, 2n).pow(12)
    const sevenOctaves = Ratio.TWO.pow(7)
    expect(twelveFifths.div(sevenOctaves).equals(COMMAS.pythagorean)).toBe(true)
    expect(12 * ratioCents(3, 2) - 7 * 1200).toBeCloseTo(23.460, 3)
  })

  it('four pure fifths exceed a pure major third plus two octaves by the syntonic comma (definition)', () => {
    const fourFifths = new Ratio(3n, 2n).pow(4)
    expect(fourFifths.div(new Ratio(5n, 4n).octaves(2)).equals(COMMAS.syntonic)).toBe(true)
  })

  it('the schisma is the Pythagorean comma less the syntonic comma (definition)', () => {
    expect(COMMAS.pythagorean.div(COMMAS.syntonic).equals(COMMAS.schisma)).toBe(true)
  })

  it('three pure major thirds fall short of an octave by the lesser diesis (definition)', () => {
    expect(Ratio.TWO.div(new Ratio(5n, 4n).pow(3)).equals(COMMAS.lesserDiesis)).toBe(true)
  })

  it.each([
    ['just major third below the equal one', 5, 4, 400, -13.686], // common practice: about 13.7 ¢ flat of equal
    ['just fifth above the equal one', 3, 2, 700, 1.955], // common practice: about 2.0 ¢ sharp of equal
    ['harmonic seventh below the equal minor seventh', 7, 4, 1000, -31.174], // common practice: about 31.2 ¢ flat
    ['just minor third above the equal one', 6, 5, 300, 15.641], // common practice: about 15.6 ¢ sharp
  ])('the %s: %i/%i vs %i ¢ = %f ¢', (_, n, d, equal, diff) => {
    expect(ratioCents(n, d) - equal).toBeCloseTo(diff, 3)
  })

  it.each([
    [new Ratio(680, 720), '17/18'],
    [new Ratio(-6, -4), '3/2'],
    [new Ratio(6, -4), '-3/2'],
    [Ratio.parse(' 10 / 8 '), '5/4'],
    [Ratio.parse('3'), '3/1'],
    [new Ratio(5n, 1n).reduceOctave(), '5/4'],
    [new Ratio(2n, 3n).reduceOctave(), '4/3'],
    [Ratio.TWO.reduceOctave(), '1/1'],
    [toRatio(0.25), '1/4'],
    [toRatio(1 / 3), '1/3'],
    [toRatio('1/6'), '1/6'],
  ])('exact arithmetic: %s', (r, text) => {
    expect(r.toString()).toBe(text)
  })

  it('keeps large powers exact (3^40 has 64 bits)', () => {
    const r = new Ratio(3n, 2n).pow(40)
    expect(r.n).toBe(3n ** 40n)
    expect(r.cents()).toBeCloseTo(40 * 701.955000865, 5)
  })

  it.each([[0, 1], [1, 0], [-3, 2], [Number.NaN, 1]])('ratioCents(%f, %f) refuses instead of NaN', (n, d) => {
    expect(() => ratioCents(n, d)).toThrow(TuningError)
  })

  it.each(['5/', '/4', '5:4', 'abc', '-3/2'])('Ratio.parse(%j) refuses', s => {
    expect(() => Ratio.parse(s)).toThrow(TuningError)
  })

  it('names the comma between two ratios', () => {
    expect(commaName(new Ratio(40n, 27n), new Ratio(3n, 2n))?.name).toBe('a syntonic comma')
    expect(commaName(new Ratio(81n, 64n), new Ratio(5n, 4n))?.name).toBe('a syntonic comma')
    expect(commaName(new Ratio(7n, 4n), new Ratio(16n, 9n))?.name).toBe('a septimal comma')
    expect(commaName(new Ratio(5n, 4n), new Ratio(6n, 5n))).toBeNull()
  })
})
