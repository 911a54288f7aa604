// The charts' filter form: it sends only what the routes accept (their own schema), says what is
// wrong beside the field, and drops options that belong to no chosen tuning system.
import { describe, expect, it } from 'vitest'
import { mountSuspended } from '@nuxt/test-utils/runtime'
import ChartsFilters from '~/components/charts/ChartsFilters.vue'
import type { ChartChoices } from '#shared/types/charts'

const choices: ChartChoices = {
  role: 'director', userId: 1, sectionId: null, tolerance: 10,
  drills: [{ id: 7, title: 'Cadence' }], assignments: [{ id: 3, title: 'Week 3', drillId: 7 }],
  sections: [{ id: 1, name: 'Soprano' }, { id: 2, name: 'Alto' }], players: [{ userId: 5, name: 'Ada Example', sectionId: 1 }],
}
const mount = (view: 'ensemble' | 'section' | 'player' = 'ensemble') =>
  mountSuspended(ChartsFilters, { props: { view, filters: {}, choices, defaults: { userId: 5, sectionId: 1 } }, attachTo: document.body })

describe('ChartsFilters', () => {
  it('applies a drill, a date range and a re-scoring under meantone with its comma fraction', async () => {
    const w = await mount()
    await w.get('select[id$="-drillId"]').setValue('7')
    await w.get('input[id$="-from"]').setValue('2026-03-01')
    await w.get('input[id$="-to"]').setValue('2026-03-31')
    await w.get('select[id$="-system"]').setValue('meantone')
    // Quarter-comma meantone, the usual default (common practice); 1/6 asked for here.
    await w.get('input[id$="-fraction"]').setValue('1/6')
    await w.get('input[id$="-a4"]').setValue('442')
    await w.get('form').trigger('submit')
    expect(w.emitted('apply')?.[0]?.[0]).toEqual({ drillId: '7', from: '2026-03-01', to: '2026-03-31', system: 'meantone', fraction: '1/6', a4: '442' })
  })

  it('refuses a range that ends before it starts and an A4 outside 415–466 Hz, beside each field', async () => {
    const w = await mount()
    await w.get('input[id$="-from"]').setValue('2026-05-01')
    await w.get('input[id$="-to"]').setValue('2026-04-01')
    await w.get('input[id$="-a4"]').setValue('500')
    await w.get('form').trigger('submit')
    expect(w.emitted('apply')).toBeUndefined()
    const to = w.get('input[id$="-to"]')
    expect(to.attributes('aria-invalid')).toBe('true')
    expect(w.get(`#${to.attributes('aria-describedby')!.split(' ')[0]}`).text()).toBe('“To” must not be before “From”.')
    const a4 = w.get('input[id$="-a4"]')
    expect(a4.attributes('aria-invalid')).toBe('true')
    expect(w.text()).toContain('A4 must be a number from 415 to 466 Hz.')
    expect(document.activeElement?.getAttribute('aria-invalid')).toBe('true')
    w.unmount()
  })

  it('offers players in the player view and sections in the section view only', async () => {
    expect((await mount('player')).find('select[id$="-userId"]').exists()).toBe(false) // one player: nothing to choose
    const s = await mount('section')
    expect(s.findAll('select[id$="-sectionId"] option').map(o => o.text())).toEqual(['The first section', 'Soprano', 'Alto'])
    expect(s.find('select[id$="-userId"]').exists()).toBe(false)
  })

  // A 12-note 5-limit just scale in the Scala .scl format (description, count, pitches, the
  // octave last: the format's published specification); the ratios are common practice.
  const JUST_SCL = '! just12.scl\nJust twelve, 5-limit\n 12\n!\n16/15\n9/8\n6/5\n5/4\n4/3\n45/32\n3/2\n8/5\n5/3\n9/5\n15/8\n2/1\n'
  const chooseFile = async (w: Awaited<ReturnType<typeof mount>>, text: string, name = 'just12.scl') => {
    const input = w.get('input[id$="-scala"]')
    Object.defineProperty(input.element, 'files', { value: [new File([text], name, { type: 'text/plain' })], configurable: true })
    await input.trigger('change')
    await new Promise(r => setTimeout(r, 20))
    await w.vm.$nextTick()
  }

  it('scores under a Scala scale read from a .scl file, sent as the file’s text', async () => {
    const w = await mount()
    await w.get('select[id$="-system"]').setValue('scala')
    await chooseFile(w, JUST_SCL)
    expect(w.get('[data-testid="scala-loaded"]').text()).toContain('Just twelve, 5-limit (12 pitches)')
    await w.get('input[id$="-tonic"]').setValue('D')
    await w.get('form').trigger('submit')
    // The comment lines ("!") are left out: the scale travels in the address.
    expect(w.emitted('apply')?.[0]?.[0]).toEqual({ system: 'scala', scala: JUST_SCL.split('\n').filter(l => !l.startsWith('!')).join('\n').trim(), tonic: 'D' })
  })

  it('refuses a file that is not a Scala scale, and a Scala system with no file, beside the field', async () => {
    const w = await mount()
    await w.get('select[id$="-system"]').setValue('scala')
    await chooseFile(w, 'not a scale\nat all\n', 'notes.txt')
    const input = w.get('input[id$="-scala"]')
    expect(input.attributes('aria-invalid')).toBe('true')
    expect(w.text()).toContain('This is not a Scala .scl file')
    await w.get('form').trigger('submit')
    expect(w.emitted('apply')).toBeUndefined()
    expect(w.text()).toMatch(/Scala/)
    w.unmount()
  })

  it('clears every filter at once', async () => {
    const w = await mountSuspended(ChartsFilters, { props: { view: 'ensemble', filters: { drillId: '7', tolerance: '5' }, choices, defaults: {} } })
    await w.findAll('button').find(b => b.text() === 'Clear filters')!.trigger('click')
    expect(w.emitted('apply')?.[0]?.[0]).toEqual({})
  })
})
