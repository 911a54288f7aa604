// A wrong note reads the same in the hold table (wide and phone layouts) and the summary, and is
// never shown as a tuning deviation; a drift without enough holds says "not enough holds"
// (summary, take history, home); takes sent in the same minute are told apart.
import { describe, expect, it } from 'vitest'
import { mountSuspended } from '@nuxt/test-utils/runtime'
import TakeHoldTable from '~/components/takes/TakeHoldTable.vue'
import TakeSummary from '~/components/takes/TakeSummary.vue'
import TakeHistory from '~/components/takes/TakeHistory.vue'
import HomeRecent from '~/components/home/HomeRecent.vue'
import type { ReportHold as TakeHold } from '#shared/types/take'

// Equal-tempered frequencies at A4 = 440 Hz (standard table): C4 261.626 Hz, E♭4 311.127 Hz,
// A3 220.000 Hz. E♭4 is three semitones, 300 ¢, above C4 (100 ¢ per semitone, common practice).
const inTune: TakeHold = {
  index: 0, note: 'C4', member: 'root', startS: 0.5, endS: 2.5, targetHz: 261.6256, detectedHz: 262.38,
  centsFromTarget: 4.99, centsFromEqual: 4.99, spreadCents: 2, slopeCentsPerS: 0.3, confidence: 0.95, withinTolerance: true, reason: null,
}
const wrong = {
  index: 1, note: 'C4', member: 'root', startS: 3, endS: 5, targetHz: 261.6256, detectedHz: 311.127,
  centsFromTarget: null, centsFromEqual: null, spreadCents: 3, slopeCentsPerS: 0.1, confidence: 0.58, withinTolerance: null,
  reason: 'Heard a pitch about 3 semitones above C4', reasonCode: 'wrong_note', heardNote: 'Eb4', heardCentsFromExpected: 300.0,
} as TakeHold
const low = { ...wrong, index: 2, startS: 6, endS: 8, detectedHz: 220, heardNote: 'A3', heardCentsFromExpected: -300.0 } as TakeHold
const WRONG = 'Wrong note: heard E\u266d4, +300 ¢ from the expected C4'
const LOW = 'Wrong note: heard A3, \u2212300 ¢ from the expected C4'

describe('wrong notes on the take page', () => {
  it('the hold table names the wrong note and shows no deviation badge for it', async () => {
    const w = await mountSuspended(TakeHoldTable, { props: { holds: [inTune, wrong, low], tolerance: 10, part: 'Lead' } })
    const rows = w.findAll('tbody tr')
    expect(rows[1]!.find('[data-col="wrong-note"]').text()).toBe(WRONG)
    expect(rows[2]!.find('[data-col="wrong-note"]').text()).toBe(LOW)
    // The measured pitch stays visible; no signed tuning figure, no "no pitch found".
    expect(rows[1]!.text()).toContain('311.13 Hz')
    expect(rows[1]!.findComponent({ name: 'DeviationBadge' }).exists()).toBe(false)
    expect(rows[1]!.text()).not.toContain('no pitch found')
    expect(rows[1]!.text()).not.toMatch(/\+\d+\.\d ¢/)
    expect(w.find('caption').text()).toContain('1 of 3 found, 2 wrong notes')
  })

  it('the phone layout gives one card per hold, with the score or the wrong note first', async () => {
    const w = await mountSuspended(TakeHoldTable, { props: { holds: [inTune, wrong], tolerance: 10, part: 'Lead', playable: true } })
    const cards = w.findAll('[data-testid="hold-cards"] > li')
    expect(cards).toHaveLength(2)
    expect(cards[0]!.find('[data-col="from-target"]').text()).toContain('From target')
    expect(cards[0]!.find('[data-col="from-target"]').text()).toContain('+5.0 ¢')
    expect(cards[1]!.find('[data-col="wrong-note"]').text()).toBe(WRONG)
    expect(cards[1]!.find('button').text()).toBe('Hear hold 2')
    // The cards show under the md breakpoint, the table from it.
    expect(w.find('[data-testid="hold-cards"]').classes()).toContain('md:hidden')
    expect(w.find('[data-testid="hold-table"]').element.parentElement!.className).toMatch(/\bhidden\b.*\bmd:block\b|\bmd:block\b.*\bhidden\b/)
  })

  it('the summary lists wrong notes in the same words, apart from the figures', async () => {
    const w = await mountSuspended(TakeSummary, {
      props: {
        summary: { meanAbsCents: 4.99, withinToleranceShare: 1, driftCentsPerMin: null, holdsFound: 1, holdsExpected: 3 },
        tolerance: 10, systemLabel: 'Equal temperament, A4 = 440 Hz', a4: 440, holds: [inTune, wrong, low],
      },
    })
    const list = w.find('[data-testid="summary-wrong-notes"]')
    expect(list.text()).toContain(`Hold 2: ${WRONG}`)
    expect(list.text()).toContain(`Hold 3: ${LOW}`)
    expect(w.find('[data-testid="summary-drift"]').text()).toContain('not enough holds')
    // The reference pitch is named once.
    expect(w.text().match(/A4 = 440 Hz/g)).toHaveLength(1)
  })
})

describe('drift and times in the take history and on home', () => {
  it('says "not enough holds" for an analysed take without a drift, and a figure otherwise', async () => {
    const w = await mountSuspended(TakeHistory, {
      props: {
        current: { id: 5, createdAt: '2026-03-10T18:00:00Z', status: 'analysed', meanAbsCents: 6, withinToleranceShare: 0.8, driftCentsPerMin: null },
        earlier: [
          { id: 4, createdAt: '2026-03-09T18:00:00Z', status: 'analysed', meanAbsCents: 7, withinToleranceShare: 0.6, driftCentsPerMin: -2.44 },
          { id: 3, createdAt: '2026-03-08T18:00:00Z', status: 'queued', meanAbsCents: null, withinToleranceShare: null, driftCentsPerMin: null },
        ],
        tolerance: 10,
        playerName: 'Ada Example',
        own: true,
      },
    })
    const drift = w.findAll('[data-col="drift"]').map(c => c.text())
    expect(drift).toEqual(['not enough holds', '\u22122.4 ¢/min', '—'])
  })

  it('tells apart two takes sent in the same minute', async () => {
    const w = await mountSuspended(TakeHistory, {
      props: {
        current: { id: 9, createdAt: '2026-03-10T18:00:41Z', meanAbsCents: 6, withinToleranceShare: 0.8 },
        earlier: [{ id: 8, createdAt: '2026-03-10T18:00:07Z', meanAbsCents: 7, withinToleranceShare: 0.6 }],
        tolerance: 10,
        playerName: 'Ada Example',
        own: true,
      },
    })
    const labels = w.findAll('tbody th').map(th => th.text())
    expect(labels).toHaveLength(2)
    expect(labels[0]).not.toBe(labels[1]!.replace(' (this take)', ''))
    expect(labels[0]).toMatch(/18:00:41/)
    expect(labels[1]).toMatch(/18:00:07/)
  })

  it('tells apart two takes sent in the same second by their order', async () => {
    const w = await mountSuspended(TakeHistory, {
      props: {
        current: { id: 9, createdAt: '2026-03-10T18:00:07.900Z', meanAbsCents: 6, withinToleranceShare: 0.8 },
        earlier: [{ id: 8, createdAt: '2026-03-10T18:00:07.100Z', meanAbsCents: 7, withinToleranceShare: 0.6 }],
        tolerance: 10,
        playerName: 'Ada Example',
        own: true,
      },
    })
    const labels = w.findAll('tbody th').map(th => th.text())
    expect(labels[0]).toContain('2nd that second')
    expect(labels[1]).toContain('1st that second')
  })

  it('home lists the drift of recent takes, or "not enough holds"', async () => {
    const base = { drillTitle: 'Held fifths', part: 'Alto', status: 'analysed' as const, createdAt: '2026-03-10T18:00:00Z', meanAbsCents: 5, withinToleranceShare: 0.9, tolerance: 10, review: null }
    const w = await mountSuspended(HomeRecent, {
      props: { items: [{ ...base, takeId: 1, driftCentsPerMin: null }, { ...base, takeId: 2, driftCentsPerMin: 1.25 }] },
    })
    const drift = w.findAll('[data-testid="recent-drift"]').map(d => d.text())
    expect(drift).toEqual(['drift not enough holds', 'drift +1.3 ¢/min'])
  })
})
