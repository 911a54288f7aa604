import { describe, expect, it } from 'vitest'
import { mountSuspended } from '@nuxt/test-utils/runtime'
import ChartsViewTabs from '~/components/charts/ChartsViewTabs.vue'

// Tabs as the WAI-ARIA Authoring Practices describe them (W3C): one tab in the tab order, the
// selected one; arrow keys move to the next and previous tab and wrap around.
describe('ChartsViewTabs', () => {
  it('marks the chosen view and keeps only it in the tab order', async () => {
    const w = await mountSuspended(ChartsViewTabs, { props: { views: ['ensemble', 'section', 'player'], view: 'section' } })
    const tabs = w.findAll('[role="tab"]')
    expect(tabs.map(t => t.text())).toEqual(['Ensemble', 'Section', 'Player'])
    expect(tabs.map(t => t.attributes('aria-selected'))).toEqual(['false', 'true', 'false'])
    expect(tabs.map(t => t.attributes('tabindex'))).toEqual(['-1', '0', '-1'])
  })

  it('selects with a click and with the arrow keys, wrapping at either end', async () => {
    const w = await mountSuspended(ChartsViewTabs, { props: { views: ['ensemble', 'section', 'player'], view: 'ensemble' } })
    const tabs = w.findAll('[role="tab"]')
    await tabs[2]!.trigger('click')
    await tabs[0]!.trigger('keydown', { key: 'ArrowLeft' })
    await tabs[2]!.trigger('keydown', { key: 'ArrowRight' })
    await tabs[1]!.trigger('keydown', { key: 'Enter' })
    expect(w.emitted('select')).toEqual([['player'], ['player'], ['ensemble']])
  })
})
