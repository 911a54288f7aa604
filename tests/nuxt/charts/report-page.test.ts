import { beforeAll, describe, expect, it, vi } from 'vitest'
import { flushPromises } from '@vue/test-utils'
import { mountSuspended, registerEndpoint } from '@nuxt/test-utils/runtime'
import { createError } from 'h3'
import type { ChartChoices } from '#shared/types/charts'
import ReportPage from '~/pages/charts/report.vue'

// Invented demo data: ensemble 3's figures are briefly unavailable; the caller plays in ensemble 4.
registerEndpoint('/api/_auth/session', () => ({ user: { id: 4, email: 'ada@example.org', name: 'Ada Example', siteRole: null }, loggedInAt: Date.now() }))
beforeAll(async () => {
  await useUserSession().fetch()
})
const choices = (role: ChartChoices['role']): ChartChoices => ({
  role, userId: 4, sectionId: role === 'director' ? null : 1, tolerance: 10,
  drills: [], assignments: [], sections: [{ id: 1, name: 'Alto' }], players: [],
})
registerEndpoint('/api/ensembles/3/charts/choices', () => { throw createError({ statusCode: 503, statusMessage: 'Figures are being rebuilt' }) })
registerEndpoint('/api/ensembles/4/charts/choices', () => choices('player'))

const printButton = (w: { findAll: (selector: 'button') => Array<{ text: () => string }> }) => w.findAll('button').find(b => b.text() === 'Print or save as PDF')

describe('pages/charts/report', () => {
  it('without an ensemble in the address explains why and links to the charts, with nothing to print', async () => {
    const w = await mountSuspended(ReportPage, { route: '/charts/report' })
    await flushPromises()
    expect(w.find('h1').text()).toBe('This report cannot be made')
    expect(w.text()).toContain('The address names no ensemble.')
    expect(w.text()).not.toContain('Whole ensemble')
    expect(w.find('[data-testid="report-scope"]').exists()).toBe(false)
    expect(printButton(w)).toBeUndefined()
    const link = w.findAll('a').find(a => a.text() === 'Go to the charts')!
    expect(link.attributes('href')).toMatch(/^\/charts(\?|$)/)
  })

  it('for a player explains that the report is for leaders and directors, with nothing to print', async () => {
    const w = await mountSuspended(ReportPage, { route: '/charts/report?ensemble=4' })
    await flushPromises()
    expect(w.find('h1').text()).toBe('This report cannot be made')
    expect(w.text()).toContain('The rehearsal report is for section leaders and directors')
    expect(w.text()).not.toContain('Alto')
    expect(printButton(w)).toBeUndefined()
  })

  it('offers no print button while the figures could not be loaded, but keeps the scope and a retry', async () => {
    const w = await mountSuspended(ReportPage, { route: '/charts/report?ensemble=3' })
    await flushPromises()
    expect(w.find('h1').text()).toBe('Whole ensemble')
    expect(w.find('[data-testid="report-scope"]').exists()).toBe(true)
    await vi.waitFor(() => expect(w.text()).toContain('Could not load the report'), { timeout: 5000 })
    expect(w.text()).toContain('Figures are being rebuilt (503)')
    expect(printButton(w)).toBeUndefined()
    expect(w.findAll('button').some(b => b.text() === 'Try again')).toBe(true)
  })
})
