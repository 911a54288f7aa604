// The charts' components: each table shows the figures it is given (signed, with the flat/sharp
// colour beside the number), the table toggle announces its state, and no figures give an
// empty state instead of an empty chart.
import { describe, expect, it } from 'vitest'
import { mountSuspended } from '@nuxt/test-utils/runtime'
import ChartsMemberBoxes from '~/components/charts/ChartsMemberBoxes.vue'
import ChartsHoldGrid from '~/components/charts/ChartsHoldGrid.vue'
import ChartsMemberTrend from '~/components/charts/ChartsMemberTrend.vue'
import ChartsDrift from '~/components/charts/ChartsDrift.vue'
import ChartsDrillProgress from '~/components/charts/ChartsDrillProgress.vue'
import ChartsWeeks from '~/components/charts/ChartsWeeks.vue'
import ChartsSections from '~/components/charts/ChartsSections.vue'
import ChartsWorstHolds from '~/components/charts/ChartsWorstHolds.vue'
import ChartsParticipation from '~/components/charts/ChartsParticipation.vue'
import { summarise } from '#shared/stats'
import type { ChartTake, GridCell } from '#shared/types/charts'

const MINUS = '\u2212' // U+2212 MINUS SIGN (Unicode standard), the product's sign for flat
const cents = (ratio: number) => 1200 * Math.log2(ratio)
// Equal-tempered major third (400 ¢) against a just one (5:4 = 386.31 ¢): +13.69 ¢ (common practice).
const ET_THIRD_OVER_JUST = 400 - cents(5 / 4)
// Equal-tempered fifth (700 ¢) against a just one (3:2 = 701.96 ¢): −1.96 ¢ (common practice).
const ET_FIFTH_OVER_JUST = 700 - cents(3 / 2)
const rowsOf = (table: { findAll: (s: string) => Array<{ findAll: (s: string) => Array<{ text: () => string }> }> }) =>
  table.findAll('tbody tr').map(r => r.findAll('th, td').map(c => c.text().replace(/\s+/g, ' ').trim()))

describe('ChartsMemberBoxes', () => {
  it('lists the five-number summary of a published worked example in its table', async () => {
    // Wikipedia "Quartile", example 1 (from memory): 6, 7, 15, 36, 39, 40, 41, 42, 43, 47, 49 has
    // Q1 = 25.5, median = 40, Q3 = 42.5 when quartiles interpolate linearly between closest ranks
    // (Hyndman & Fan type 7, R's default).
    const third = summarise('third', [6, 7, 15, 36, 39, 40, 41, 42, 43, 47, 49])
    const w = await mountSuspended(ChartsMemberBoxes, { props: { members: [third], tolerance: 10 } })
    const toggle = w.get('button[aria-expanded]')
    expect(toggle.attributes('aria-expanded')).toBe('false')
    const table = w.get('[data-testid="member-box-table"]')
    expect(table.element.closest('[id]')!.getAttribute('style') ?? '').toContain('display: none')
    await toggle.trigger('click')
    expect(toggle.attributes('aria-expanded')).toBe('true')
    expect(toggle.attributes('aria-controls')).toBe(table.element.parentElement!.id)
    const [row] = rowsOf(table)
    expect(row!.slice(0, 7)).toEqual(['third', '11', '+6.0 ¢', '+25.5 ¢', '+40.0 ¢ sharp', '+42.5 ¢', '+49.0 ¢'])
  })

  it('shows an empty state and no toggle without figures', async () => {
    const w = await mountSuspended(ChartsMemberBoxes, { props: { members: [], tolerance: 10 } })
    expect(w.find('[data-testid="chart-empty"]').exists()).toBe(true)
    expect(w.find('button[aria-expanded]').exists()).toBe(false)
  })
})

describe('ChartsHoldGrid', () => {
  const grid: GridCell[] = [
    { drillId: 7, chordIndex: 0, part: 'Alto', member: 'third', userId: 1, n: 3, meanCents: ET_THIRD_OVER_JUST },
    { drillId: 7, chordIndex: 0, part: 'Alto', member: 'third', userId: 2, n: 2, meanCents: ET_FIFTH_OVER_JUST },
    { drillId: 7, chordIndex: 1, part: 'Alto', member: 'fifth', userId: 1, n: 3, meanCents: -3 * ET_THIRD_OVER_JUST },
  ]
  const players = [{ userId: 1, name: 'Ada Example' }, { userId: 2, name: 'Bo Example' }]

  it('puts a signed number and the flat/sharp colour in every cell, players across and holds down', async () => {
    const w = await mountSuspended(ChartsHoldGrid, { props: { grid, players, tolerance: 10, drillTitle: () => 'Cadence' } })
    const table = w.get('[data-testid="hold-grid"]')
    expect(table.findAll('thead th').map(t => t.text())).toEqual(['Hold', 'Ada Example', 'Bo Example'])
    const rows = rowsOf(table)
    // An equal-tempered third against a just target reads +13.7 ¢ sharp.
    expect(rows[0]).toEqual(['Chord 1 · Alto (third)', '+13.7 ¢ sharp', `${MINUS}2.0 ¢ in tune`])
    expect(rows[1]).toEqual(['Chord 2 · Alto (fifth)', `${MINUS}41.1 ¢ flat`, '— no take'])
    const cells = table.findAll('td[data-token]').map(c => c.attributes('data-token'))
    // ±10 ¢ tolerance: 13.7 is beyond it (first sharp step), −2.0 within, −41.1 beyond four times it.
    expect(cells).toEqual(['sharp-1', 'in-tune', 'flat-3'])
  })

  it('says so when there is nothing to show', async () => {
    const w = await mountSuspended(ChartsHoldGrid, { props: { grid: [], players, tolerance: 10, drillTitle: () => '' } })
    expect(w.find('[data-testid="chart-empty"]').exists()).toBe(true)
    expect(w.find('table').exists()).toBe(false)
  })
})

const take = (id: number, at: string, drillId: number, members: Record<string, number>, drift: number | null): ChartTake => {
  const vals = Object.values(members)
  const mean = vals.reduce((s, v) => s + v, 0) / vals.length
  return { takeId: id, submittedAt: at, userId: 1, player: 'Ada Example', section: 'Alto', drillId, part: 'Alto', holds: vals.length, meanCents: mean, meanAbsCents: vals.reduce((s, v) => s + Math.abs(v), 0) / vals.length, withinShare: vals.filter(v => Math.abs(v) <= 10).length / vals.length, driftCentsPerMin: drift, members }
}
const takes = [
  take(11, '2026-03-02T18:00:00Z', 7, { root: 0.4, third: ET_THIRD_OVER_JUST, fifth: ET_FIFTH_OVER_JUST }, -1.26),
  take(12, '2026-03-09T18:00:00Z', 7, { root: 0.1, third: 4.2 }, null),
  take(13, '2026-03-10T18:00:00Z', 8, { root: -2 }, 0.5),
]
const titles = (id: number) => (id === 7 ? 'Cadence' : 'Long tones')

describe('player charts', () => {
  it('tabulates each take’s mean per chord member, in the chord’s order', async () => {
    const w = await mountSuspended(ChartsMemberTrend, { props: { takes, tolerance: 10, drillTitle: titles } })
    const table = w.get('[data-testid="member-trend-table"]')
    expect(table.findAll('thead th').map(t => t.text())).toEqual(['Submitted', 'Drill', 'root', 'third', 'fifth'])
    expect(rowsOf(table)[0]).toEqual(['2 Mar 2026', 'Cadence', '+0.4 ¢ in tune', '+13.7 ¢ sharp', `${MINUS}2.0 ¢ in tune`])
    expect(rowsOf(table)[1]![4]).toBe('—')
  })

  it('gives drift per take signed in cents per minute, and says when a take cannot tell', async () => {
    const w = await mountSuspended(ChartsDrift, { props: { takes, drillTitle: titles } })
    expect(rowsOf(w.get('[data-testid="drift-table"]')).map(r => r[2])).toEqual([`${MINUS}1.3 ¢/min`, 'not enough holds', '+0.5 ¢/min'])
  })

  it('shows the most practised drill’s attempts and switches drill from its menu', async () => {
    const w = await mountSuspended(ChartsDrillProgress, { props: { takes, tolerance: 10, drillTitle: titles } })
    const table = () => w.get('[data-testid="progress-table"]')
    expect(rowsOf(table()).map(r => r[0])).toEqual(['1', '2'])
    expect(rowsOf(table())[1]![2]).toBe('2.2 ¢')
    await w.get('select').setValue('8')
    expect(rowsOf(table())).toHaveLength(1)
    expect(rowsOf(table())[0]![3]).toBe(`${MINUS}2.0 ¢ in tune`)
  })

  it('has an empty state for a player with no analysed take', async () => {
    for (const C of [ChartsMemberTrend, ChartsDrillProgress]) {
      const w = await mountSuspended(C, { props: { takes: [], tolerance: 10, drillTitle: titles } })
      expect(w.find('[data-testid="chart-empty"]').exists()).toBe(true)
    }
  })
})

describe('section and ensemble charts', () => {
  it('labels weeks by their Monday and gives the signed mean beside its colour', async () => {
    // 2 March 2026 is a Monday (ISO 8601 weeks start on Monday; calendar, common practice).
    const w = await mountSuspended(ChartsWeeks, {
      props: {
        weeks: [{ weekStart: '2026-03-02', takes: 4, meanAbsCents: 7.25, meanCents: -6.04 }, { weekStart: '2026-03-09', takes: 1, meanAbsCents: 2, meanCents: 2 }],
        drift: [{ weekStart: '2026-03-02', takes: 3, driftCentsPerMin: -1.24 }],
        tolerance: 5,
      },
    })
    const rows = rowsOf(w.get('[data-testid="weeks-table"]'))
    // The week's drift within takes beside its figures; a week with no take long enough to tell says so.
    expect(rows[0]).toEqual(['2 Mar 2026', '4', '7.3 ¢', `${MINUS}6.0 ¢ flat`, `${MINUS}1.2 ¢/min over 3 takes`])
    expect(rows[1]![4]).toBe('not enough holds')
  })

  it('sets sections side by side and leaves out sections with no scored hold', async () => {
    const w = await mountSuspended(ChartsSections, {
      props: {
        tolerance: 10,
        sections: [
          { sectionId: 1, section: 'Soprano', players: 3, takes: 9, holds: 90, meanCents: ET_THIRD_OVER_JUST, meanAbsCents: 14.1, withinShare: 0.42 },
          { sectionId: 2, section: 'Alto', players: 2, takes: 0, holds: 0, meanCents: null, meanAbsCents: null, withinShare: null },
        ],
      },
    })
    expect(rowsOf(w.get('[data-testid="sections-table"]'))).toEqual([['Soprano', '3', '9', '90', '14.1 ¢', '+13.7 ¢ sharp', '42 %']])
  })

  it('names drill, chord, part, sections and member of the holds most often out of tolerance', async () => {
    const w = await mountSuspended(ChartsWorstHolds, { props: { tolerance: 10, drillTitle: titles, tableOpen: true, holds: [{ drillId: 7, chordIndex: 2, part: 'Tenor', member: 'third', sections: ['Tenor 1', 'Tenor 2'], n: 12, outShare: 0.75, meanCents: ET_THIRD_OVER_JUST }] } })
    expect(w.get('button[aria-expanded]').attributes('aria-expanded')).toBe('true')
    expect(rowsOf(w.get('[data-testid="worst-holds-table"]'))[0]).toEqual(['Cadence', '3', 'Tenor', 'Tenor 1, Tenor 2', 'third', '12', '75 %', '+13.7 ¢ sharp'])
  })

  it('counts who was asked and names who has not sent a take', async () => {
    const w = await mountSuspended(ChartsParticipation, {
      props: {
        items: [
          { assignmentId: 1, title: 'Week 3 cadence', drillId: 7, sectionId: null, dueAt: '2026-03-09T12:00:00Z', expected: 4, submitted: 3, missing: [{ userId: 4, name: 'Di Example', section: 'Bass' }] },
          { assignmentId: 2, title: 'Long tones', drillId: 8, sectionId: 2, dueAt: null, expected: 2, submitted: 2, missing: [] },
        ],
      },
    })
    expect(rowsOf(w.get('[data-testid="participation-table"]'))).toEqual([
      ['Week 3 cadence due 9 Mar 2026', '4', '3', '75 %', 'Di Example'],
      ['Long tones', '2', '2', '100 %', 'everyone'],
    ])
  })
})
