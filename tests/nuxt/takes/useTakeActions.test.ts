import { describe, expect, it, vi } from 'vitest'
import { defineComponent, h } from 'vue'
import { flushPromises } from '@vue/test-utils'
import { mountSuspended, registerEndpoint } from '@nuxt/test-utils/runtime'
import { useTakeActions } from '~/composables/useTakeActions'
import { useTakeReview } from '~/composables/useTakeReview'

// What a take page does to its take, against stand-in routes with the real paths and error
// shapes (server/utils/errors.ts: the message in statusMessage, a stable code in data).
let withdrawCalls = 0
registerEndpoint('/api/takes/31/withdraw', { method: 'POST', handler: () => { withdrawCalls++; return { id: 31, withdrawnAt: '2026-12-03T07:00:00Z' } } })
registerEndpoint('/api/takes/32/reanalyse', { method: 'POST', handler: () => { throw createError({ statusCode: 409, statusMessage: 'Analysis already queued or running', message: 'Analysis already queued or running', data: { code: 'analysis_in_progress' } }) } })
registerEndpoint('/api/takes/31/rescore', { method: 'POST', handler: () => ({ report: { a4: 442, tolerance: 8, holds: [], summary: {} } }) })
registerEndpoint('/api/takes/31/reviews', { method: 'POST', handler: () => ({ created: true, review: { id: 1 } }) })
registerEndpoint('/api/takes/32/reviews', {
  method: 'POST',
  handler: () => { throw createError({ statusCode: 400, statusMessage: 'Note 2 is after the end of the take', message: 'Note 2 is after the end of the take', data: { code: 'note_outside_take', noteIndex: 1 } }) },
})

function harness<T>(use: () => T) {
  let api!: T
  const C = defineComponent({ setup() { api = use(); return () => h('p') } })
  return { mount: () => mountSuspended(C), api: () => api }
}

describe('useTakeActions', () => {
  it('withdraws once at a time, reloads the take and says what became of it', async () => {
    const reload = vi.fn(async () => {})
    const t = harness(() => useTakeActions(() => 31, reload))
    await t.mount()
    const a = t.api()
    const first = a.act('withdraw')
    await a.act('withdraw') // a second click while the first is on its way does nothing
    await first
    await flushPromises()
    expect(withdrawCalls).toBe(1)
    expect(reload).toHaveBeenCalledTimes(1)
    expect(a.message.value).toBe('The take is withdrawn. Your director can still restore it.')
    expect(a.busy.value).toBeNull()
  })

  it('shows the server\'s own message when the take cannot be analysed again, and does not reload', async () => {
    const reload = vi.fn(async () => {})
    const t = harness(() => useTakeActions(() => 32, reload))
    await t.mount()
    await t.api().act('reanalyse')
    expect(reload).not.toHaveBeenCalled()
    expect(t.api().error.value).toBe('Analysis already queued or running')
    expect(t.api().error.value).not.toMatch(/undefined|\[object/)
    expect(t.api().message.value).toBeNull()
  })

  it('keeps a re-scored report beside the saved one, and drops it after another action', async () => {
    const t = harness(() => useTakeActions(() => 31, async () => {}))
    await t.mount()
    await t.api().rescore({ system: { name: 'pythagorean', seventh: 'harmonic', fraction: '1/4' }, a4: 442, tolerance: 8 } as never)
    expect(t.api().rescored.value?.a4).toBe(442)
    await t.api().act('withdraw')
    expect(t.api().rescored.value).toBeNull()
  })

  it('does nothing before the take is loaded', async () => {
    const reload = vi.fn(async () => {})
    const t = harness(() => useTakeActions(() => undefined, reload))
    await t.mount()
    await t.api().act('restore')
    expect(reload).not.toHaveBeenCalled()
    expect(t.api().busy.value).toBeNull()
  })
})

describe('useTakeReview', () => {
  it('saves, reloads and confirms that the player is mailed', async () => {
    const reload = vi.fn(async () => {})
    const t = harness(() => useTakeReview(() => 31, reload))
    await t.mount()
    await t.api().save({ verdict: 'approved', notes: [] } as never)
    expect(reload).toHaveBeenCalledTimes(1)
    expect(t.api().message.value).toBe('Review saved. The player gets an e-mail.')
    expect(t.api().saving.value).toBe(false)
  })

  it('names the note the server refused', async () => {
    const t = harness(() => useTakeReview(() => 32, async () => {}))
    await t.mount()
    await t.api().save({ verdict: 'approved', notes: [] } as never)
    expect(t.api().errorNote.value).toBe(1)
    expect(t.api().error.value).toBe('Note 2 is after the end of the take')
    expect(t.api().message.value).toBeNull()
  })
})
