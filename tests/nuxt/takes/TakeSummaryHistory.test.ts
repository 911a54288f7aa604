import { describe, expect, it } from 'vitest'
import { mountSuspended } from '@nuxt/test-utils/runtime'
import TakeSummary from '~/components/takes/TakeSummary.vue'
import TakeHistory from '~/components/takes/TakeHistory.vue'
import type { ReportHold as TakeHold } from '#shared/types/take'

describe('TakeSummary', () => {
  it('shows the take figures with signed drift and member bias, U+2212 for negatives', async () => {
    const w = await mountSuspended(TakeSummary, {
      props: {
        summary: { meanAbsCents: 7.25, withinToleranceShare: 0.625, driftCentsPerMin: -3.4, holdsFound: 5, holdsExpected: 6 },
        tolerance: 10,
        systemLabel: 'Just intonation from each chord\'s root',
        a4: 442,
        memberBias: { fifth: 1.2, third: 12.4, root: -0.6 },
        durationS: 75,
      },
    })
    expect(w.find('[data-testid="summary-mean"]').text()).toContain('7.3 ¢')
    expect(w.find('[data-testid="summary-share"]').text()).toBe('63 %')
    expect(w.find('[data-testid="summary-drift"]').text()).toContain('\u22123.4 ¢/min')
    expect(w.find('[data-testid="summary-drift"]').text()).toContain('sagging flat')
    expect(w.find('[data-testid="summary-found"]').text()).toContain('5 of 6')
    expect(w.find('[data-testid="summary-found"]').text()).toContain('1:15')
    expect(w.text()).toContain('A4 = 442 Hz')
    // Members in chord order: root, third, fifth.
    const items = w.findAll('li').map(li => li.text())
    expect(items[0]).toMatch(/^root\s*\u22120\.6 ¢/)
    expect(items[1]).toMatch(/^third\s*\+12\.4 ¢/)
    expect(items[2]).toMatch(/^fifth\s*\+1\.2 ¢/)
  })

  it('shows dashes, never NaN, when nothing was found', async () => {
    const w = await mountSuspended(TakeSummary, {
      props: { summary: { meanAbsCents: null, withinToleranceShare: null, driftCentsPerMin: null, holdsFound: 0, holdsExpected: 4 }, tolerance: 10, systemLabel: 'Equal', a4: 440 },
    })
    expect(w.text()).not.toContain('NaN')
    expect(w.find('[data-testid="summary-share"]').text()).toBe('—')
    // No drift figure without holds: the words say why instead of a dash or a number.
    expect(w.find('[data-testid="summary-drift"]').text()).toContain('not enough holds')
  })
})

describe('TakeSummary for a part sung by several voices', () => {
  const summary = { meanAbsCents: 4.2, withinToleranceShare: 0.75, driftCentsPerMin: null, holdsFound: 2, holdsExpected: 2 }
  const hold = (voiceSpreadCents: number | null, centreErrorCents: number) => ({ index: 0, voiceSpreadCents, centreErrorCents, startS: 2, endS: 3.8 }) as unknown as TakeHold

  it('says how closely the centres are known and that longer holds narrow it', async () => {
    const w = await mountSuspended(TakeSummary, { props: { summary, tolerance: 10, systemLabel: 'Equal', a4: 440, holds: [hold(13, 1.2), hold(11, 1.5)] } })
    // Ranges 2.7 and 3.3 ¢ (2 × se + 0.25, rounded up): median 3.0 ¢.
    expect(w.find('[data-testid="summary-voices"]').text()).toContain('known to within ±3.0 ¢ (median)')
    expect(w.find('[data-testid="summary-voices"]').text()).toContain('3 seconds or more')
  })

  it('says nothing of voices for one player', async () => {
    const w = await mountSuspended(TakeSummary, { props: { summary, tolerance: 10, systemLabel: 'Equal', a4: 440, holds: [hold(null, 1.2), hold(null, 1.5)] } })
    expect(w.find('[data-testid="summary-voices"]').exists()).toBe(false)
  })
})

describe('TakeHistory', () => {
  const current = { id: 30, createdAt: '2026-03-10T18:00:00Z', meanAbsCents: 6.1, withinToleranceShare: 0.8 }
  it('compares with the previous take and lists all newest first', async () => {
    const w = await mountSuspended(TakeHistory, {
      props: {
        current,
        tolerance: 10,
        playerName: 'Ana Ruiz',
        own: true,
        earlier: [
          { id: 22, createdAt: '2026-03-03T18:00:00Z', meanAbsCents: 9.4, withinToleranceShare: 0.5 },
          { id: 12, createdAt: '2026-02-24T18:00:00Z', meanAbsCents: 5.0, withinToleranceShare: 0.9 },
        ],
      },
    })
    // 9.4 − 6.1 = 3.3 ¢ smaller mean deviation than the previous take.
    expect(w.find('[data-testid="history-headline"]').text()).toContain('3.3 ¢ closer')
    const rows = w.findAll('tbody tr')
    expect(rows).toHaveLength(3)
    expect(rows[0]!.text()).toContain('this take')
    expect(rows[1]!.find('a').attributes('href')).toBe('/takes/22')
    expect(rows[2]!.text()).toContain('1.1 ¢ further off')
    expect(w.find('caption').exists()).toBe(true)
  })

  it('says it is the first take when there is no earlier one', async () => {
    const w = await mountSuspended(TakeHistory, { props: { current, earlier: [], tolerance: 10, playerName: 'Ana Ruiz', own: true } })
    expect(w.text()).toContain('first take of this part')
    expect(w.find('table').exists()).toBe(false)
  })
})

describe('TakeHistory without figures', () => {
  it('gives no comparison headline when this take has no mean deviation', async () => {
    const w = await mountSuspended(TakeHistory, {
      props: {
        current: { id: 31, createdAt: '2026-03-11T18:00:00Z', meanAbsCents: null, withinToleranceShare: null },
        earlier: [{ id: 30, createdAt: '2026-03-10T18:00:00Z', meanAbsCents: 6.1, withinToleranceShare: 0.8 }],
        tolerance: 10,
        playerName: 'Ana Ruiz',
        own: true,
      },
    })
    expect(w.find('[data-testid="history-headline"]').exists()).toBe(false)
    expect(w.text()).not.toContain('NaN')
  })
})

describe('TakeSummary drift with too few holds', () => {
  it('says "not enough holds" instead of a number when the report has no drift', async () => {
    const w = await mountSuspended(TakeSummary, {
      props: { summary: { meanAbsCents: 2.1, withinToleranceShare: 1, driftCentsPerMin: null, driftUncertaintyCentsPerMin: null, holdsFound: 2, holdsExpected: 2 }, tolerance: 10, systemLabel: 'Equal', a4: 440 },
    })
    expect(w.find('[data-testid="summary-drift"]').text()).toBe('not enough holds')
  })
})

describe('TakeHistory read by someone other than the player', () => {
  const current = { id: 30, createdAt: '2026-03-10T18:00:00Z', meanAbsCents: 6.1, withinToleranceShare: 0.8 }
  it('speaks of the player by name, never of "your" takes', async () => {
    const first = await mountSuspended(TakeHistory, { props: { current, earlier: [], tolerance: 10, playerName: 'Ana Ruiz', own: false } })
    expect(first.text()).toContain('This is Ana’s first take of this part')
    expect(first.text()).not.toMatch(/\byour\b/i)
    const later = await mountSuspended(TakeHistory, {
      props: { current, earlier: [{ id: 22, createdAt: '2026-03-03T18:00:00Z', meanAbsCents: 9.4, withinToleranceShare: 0.5 }], tolerance: 10, playerName: 'Ana Ruiz', own: false },
    })
    // 9.4 − 6.1 = 3.3 ¢ closer than the previous take.
    expect(later.find('[data-testid="history-headline"]').text()).toBe('Since Ana’s previous take, Ana is 3.3 ¢ closer (mean deviation).')
    expect(later.find('h2').text()).toContain('Ana’s takes')
    expect(later.text()).not.toMatch(/\byour\b/i)
  })
})
