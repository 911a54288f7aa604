// Scoring a take again: the reference pitch and tolerance are number fields; typing in them must
// keep the form whole, check each value and send numbers. Values are invented for the test; the
// limits are the drill schema's (A4 from A4_MIN to A4_MAX Hz, tolerance above 0 and at most 50 ¢).
import { describe, expect, it } from 'vitest'
import { mountSuspended } from '@nuxt/test-utils/runtime'
import TakeRescore from '~/components/takes/TakeRescore.vue'
import type { SystemOptions } from '#shared/drill/schema'

const props = { system: { name: 'equal' } as SystemOptions, a4: 440, tolerance: 10 }

describe('TakeRescore', () => {
  it('keeps the form and its button while both numbers are changed, and sends them as numbers', async () => {
    const errors: unknown[] = []
    const w = await mountSuspended(TakeRescore, { props, global: { config: { errorHandler: e => { errors.push(e) } } } })
    const [a4, tol] = w.findAll('input[type="number"]')
    await a4!.setValue('441')
    await tol!.setValue('12')
    expect(errors).toEqual([])
    expect(w.find('button[type="submit"]').exists()).toBe(true)
    expect(w.find('.field-error').exists()).toBe(false)
    await w.find('form').trigger('submit')
    expect(w.emitted('rescore')?.[0]?.[0]).toMatchObject({ a4: 441, tolerance: 12, system: { name: 'equal' } })
  })

  it('says what is wrong with a value out of range or empty, and sends nothing', async () => {
    const w = await mountSuspended(TakeRescore, { props })
    const [a4, tol] = w.findAll('input[type="number"]')
    await a4!.setValue('300')
    await tol!.setValue('')
    const text = w.text()
    expect(text).toMatch(/A reference pitch from \d+ to \d+ Hz/)
    expect(text).toContain('A tolerance above 0 and at most 50 cents')
    await w.find('form').trigger('submit')
    expect(w.emitted('rescore')).toBeUndefined()
  })
})
