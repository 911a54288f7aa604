import { describe, expect, it } from 'vitest'
import { mountSuspended } from '@nuxt/test-utils/runtime'
import DeviationBadge from '~/components/deviation/DeviationBadge.vue'
import DeviationLegend from '~/components/deviation/DeviationLegend.vue'

describe('DeviationBadge', () => {
  it.each([
    // cents, tolerance, visible text, word read aloud, token, colour class
    [-6.2, 5, '\u22126.2 ¢', 'flat', 'flat-1', 'bg-flat-1'],
    [-25, 5, '\u221225.0 ¢', 'flat', 'flat-3', 'bg-flat-3'],
    [3, 5, '+3.0 ¢', 'in tune', 'in-tune', 'bg-in-tune'],
    [12, 5, '+12.0 ¢', 'sharp', 'sharp-2', 'bg-sharp-2'],
    [0, 5, '0.0 ¢', 'in tune', 'in-tune', 'bg-in-tune'],
  ])('%s ¢ at ±%s ¢ shows %s and says %s', async (cents, tolerance, text, word, token, cls) => {
    const w = await mountSuspended(DeviationBadge, { props: { cents, tolerance } })
    const root = w.get('span')
    expect(root.attributes('data-token')).toBe(token)
    expect(root.classes()).toContain(cls)
    expect(w.text()).toContain(text)
    expect(w.get('.sr-only').text()).toBe(word)
    // The sign is the non-colour cue for flat and sharp.
    if (cents < 0) expect(w.text()).toContain('\u2212')
    expect(w.text()).not.toMatch(/-\d/)
  })

  it('says "no pitch found" for null, with the neutral fill and no direction word', async () => {
    const w = await mountSuspended(DeviationBadge, { props: { cents: null, tolerance: 10 } })
    expect(w.text()).toBe('no pitch found')
    expect(w.get('span').attributes('data-token')).toBe('none')
    expect(w.get('span').classes()).toContain('bg-no-pitch')
    expect(w.find('.sr-only').exists()).toBe(false)
  })

  it('shows a mean absolute deviation without a sign', async () => {
    const inside = await mountSuspended(DeviationBadge, { props: { cents: 4.26, tolerance: 10, absolute: true } })
    expect(inside.text()).toContain('4.3 ¢')
    expect(inside.text()).not.toMatch(/[+\u2212]/)
    expect(inside.get('.sr-only').text()).toBe('within tolerance')
    const outside = await mountSuspended(DeviationBadge, { props: { cents: 31, tolerance: 10, absolute: true } })
    expect(outside.get('span').attributes('data-token')).toBe('off-2')
    expect(outside.get('.sr-only').text()).toBe('outside tolerance')
  })
})

describe('DeviationLegend', () => {
  it('lists the seven steps flat to sharp with ranges and words', async () => {
    const w = await mountSuspended(DeviationLegend, { props: { tolerance: 10 } })
    const items = w.findAll('li')
    expect(items.map(i => i.attributes('data-token'))).toEqual(['flat-3', 'flat-2', 'flat-1', 'in-tune', 'sharp-1', 'sharp-2', 'sharp-3'])
    expect(items[3]!.text()).toContain('±10.0 ¢')
    expect(items[0]!.text()).toContain('more than \u221240.0 ¢')
    expect(items[0]!.get('.sr-only').text().trim()).toBe('flat')
    expect(w.get('[role="group"]').attributes('aria-labelledby')).toBeTruthy()
  })
})
