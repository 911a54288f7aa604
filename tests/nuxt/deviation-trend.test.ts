import { describe, expect, it } from 'vitest'
import { mountSuspended } from '@nuxt/test-utils/runtime'
import DeviationTrend from '~/components/deviation/DeviationTrend.vue'

describe('DeviationTrend', () => {
  it('draws analysed points oldest to newest and says what it shows', async () => {
    const w = await mountSuspended(DeviationTrend, {
      props: {
        tolerance: 10,
        points: [
          { key: 2, at: '2025-03-08T10:00:00Z', cents: 6.04, label: 'second' },
          { key: 1, at: '2025-03-01T10:00:00Z', cents: 18.2, label: 'first' },
          { key: 3, at: '2025-03-09T10:00:00Z', cents: null, label: 'no pitch' },
        ],
      },
    })
    const img = w.get('svg[role="img"]')
    expect(img.attributes('aria-label')).toBe(
      'Mean deviation per take, 2 takes from oldest to newest: first 18.2 ¢, latest 6.0 ¢; 1 within the ±10 ¢ tolerance.',
    )
    const dots = w.findAll('span[title]')
    expect(dots.map(d => d.attributes('title'))).toEqual(['first: 18.2 ¢', 'second: 6.0 ¢'])
    // The worse take sits higher on the chart (further from the target).
    const top = (i: number) => Number.parseFloat(String(dots[i]!.attributes('style')).match(/top:\s*([\d.]+)%/)![1]!)
    expect(top(0)).toBeLessThan(top(1))
  })

  it('says so when there is nothing to draw', async () => {
    const w = await mountSuspended(DeviationTrend, { props: { tolerance: 5, points: [] } })
    expect(w.get('svg').attributes('aria-label')).toBe('Mean deviation per take: no analysed takes yet.')
  })
})
