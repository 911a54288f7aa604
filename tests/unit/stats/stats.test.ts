// The pure figures behind the charts: quantiles, ISO weeks, CSV fields and the aggregation.
import { describe, expect, it } from 'vitest'
import { buildStats, isoWeekStart, quantileSorted, summarise } from '../../../shared/stats'
import { csvField, csvLine } from '../../../shared/csv'
import type { StatHoldRow } from '../../../shared/types/stats'

describe('quantileSorted (Hyndman & Fan 1996, type 7)', () => {
  // Wikipedia, "Percentile", section "The linear interpolation between closest ranks method",
  // variant C = 1 (the one spreadsheets' PERCENTILE.INC and R's default use), worked example on
  // the list 15, 20, 35, 40, 50: the 40th percentile is 29 and the 75th is 40.
  it.each([
    [0.4, 29],
    [0.75, 40],
    [0, 15],
    [1, 50],
    [0.5, 35],
  ])('of 15, 20, 35, 40, 50 at p = %s is %s', (p, q) => {
    expect(quantileSorted([15, 20, 35, 40, 50], p)).toBeCloseTo(q, 10)
  })

  // NumPy documentation, numpy.percentile (default method "linear" = type 7; from memory): the median of
  // [10, 7, 4, 3, 2, 1] is 3.5.
  it('gives the median of an even count as the mean of the middle two', () => {
    expect(quantileSorted([1, 2, 3, 4, 7, 10], 0.5)).toBe(3.5)
  })

  it('is NaN for no values rather than inventing one', () => {
    expect(quantileSorted([], 0.5)).toBeNaN()
  })

  it('summarises a member with quartiles, rounded to 0.01', () => {
    expect(summarise('third', [50, 15, 40, 20, 35])).toEqual({ member: 'third', n: 5, meanCents: 32, medianCents: 35, q1: 20, q3: 40, min: 15, max: 50 })
  })
})

describe('isoWeekStart (ISO 8601 weeks begin on Monday; common practice)', () => {
  it.each([
    // 2026-01-01 is a Thursday, so ISO week 1 of 2026 begins on Monday 2025-12-29 (ISO 8601:
    // week 1 is the week with the year's first Thursday).
    ['2026-01-01T12:00:00.000Z', '2025-12-29'],
    ['2025-12-29T00:00:00.000Z', '2025-12-29'],
    // A Sunday belongs to the week that began six days earlier.
    ['2026-03-08T23:59:59.999Z', '2026-03-02'],
    ['2026-03-09T00:00:00.000Z', '2026-03-09'],
  ])('puts %s in the week of %s', (at, monday) => {
    expect(isoWeekStart(at)).toBe(monday)
  })
})

describe('csvField / csvLine (RFC 4180)', () => {
  it('quotes fields holding a comma, a quote or a line break, doubling quotes (RFC 4180 §2.6–2.7)', () => {
    expect(csvLine([csvField('a,b'), csvField('say "hi"'), csvField('two\nlines'), csvField('plain')])).toBe('"a,b","say ""hi""","two\nlines",plain\r\n')
  })
  it('leaves empty fields for null and writes booleans and numbers plainly', () => {
    expect(csvLine([csvField(null), csvField(true), csvField(-3.25), csvField(Number.NaN)])).toBe(',true,-3.25,\r\n')
  })
  it('defuses text a spreadsheet would run as a formula (OWASP, "CSV Injection")', () => {
    expect(csvField('=SUM(A1)', true)).toBe("'=SUM(A1)")
    expect(csvField('-3.5', false)).toBe('-3.5')
  })
})

describe('buildStats', () => {
  const row = (o: Partial<StatHoldRow>): StatHoldRow => ({ takeId: 1, submittedAt: '2026-03-04T10:00:00.000Z', userId: 1, player: 'P', section: 'Alto', drillId: 1, part: 'Alto', chordIndex: 0, member: 'root', centsFromTarget: 0, withinTolerance: true, ...o })
  it('counts takes once and holds once, and takes without scored holds too', () => {
    const s = buildStats([{ takeId: 3, submittedAt: '2026-03-05T10:00:00.000Z', userId: 2, player: 'Q', section: 'Alto', drillId: 1, part: 'Alto' }], [
      row({ centsFromTarget: 4 }), row({ chordIndex: 1, member: 'third', centsFromTarget: -12, withinTolerance: false }), row({ takeId: 2, centsFromTarget: 2 }),
    ])
    expect(s.takes).toBe(3)
    expect(s.holds).toBe(3)
    expect(s.players.find(p => p.userId === 2)).toMatchObject({ takes: 1, holds: 0, meanAbsCents: null, withinShare: null })
    expect(s.players.find(p => p.userId === 1)).toMatchObject({ takes: 2, holds: 3, meanAbsCents: 6, meanCents: -2, withinShare: 0.67 })
    expect(s.members.map(m => m.member)).toEqual(['root', 'third'])
    expect(s.weeks).toEqual([{ weekStart: '2026-03-02', takes: 3, meanAbsCents: 6, meanCents: -2 }])
    expect(s.worstHolds).toEqual([{ drillId: 1, chordIndex: 1, part: 'Alto', member: 'third', sections: ['Alto'], n: 1, outShare: 1, meanCents: -12 }])
  })
  it('names every section whose players sang an out-of-tolerance hold, once each and sorted', () => {
    const s = buildStats([], [
      row({ chordIndex: 2, section: 'Tenor 2', centsFromTarget: 15, withinTolerance: false }),
      row({ takeId: 2, chordIndex: 2, section: 'Tenor 1', centsFromTarget: 12, withinTolerance: false }),
      row({ takeId: 3, chordIndex: 2, section: 'Tenor 2', centsFromTarget: 3 }),
      row({ takeId: 4, chordIndex: 2, section: null, centsFromTarget: 30, withinTolerance: false }),
    ])
    expect(s.worstHolds).toHaveLength(1)
    expect(s.worstHolds[0]).toMatchObject({ chordIndex: 2, sections: ['Tenor 1', 'Tenor 2'], n: 4, outShare: 0.75 })
  })
})
