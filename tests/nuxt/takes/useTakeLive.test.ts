import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { defineComponent, h } from 'vue'
import { flushPromises } from '@vue/test-utils'
import { mountSuspended, registerEndpoint } from '@nuxt/test-utils/runtime'
import type { TakeLiveState } from '#shared/types/take'
import { useTakeLive } from '~/composables/useTake'

class FakeEventSource {
  static all: FakeEventSource[] = []
  listeners: Record<string, ((e: MessageEvent) => void)[]> = {}
  onerror: (() => void) | null = null
  closed = false
  constructor(readonly url: string) { FakeEventSource.all.push(this) }
  addEventListener(type: string, fn: (e: MessageEvent) => void) { (this.listeners[type] ??= []).push(fn) }
  close() { this.closed = true }
  emit(type: string, data: unknown) { this.listeners[type]?.forEach(fn => fn({ data: JSON.stringify(data) } as MessageEvent)) }
}

function harness(id: number, initial: TakeLiveState, onSettled: (s: TakeLiveState) => void) {
  return defineComponent({
    setup() {
      const live = useTakeLive(id, initial, onSettled, { pollMs: 30 })
      return () => h('p', { 'data-mode': live.mode.value }, `${live.state.value?.status} ${live.state.value?.progress}`)
    },
  })
}

describe('useTakeLive', () => {
  beforeEach(() => {
    FakeEventSource.all = []
    vi.stubGlobal('EventSource', FakeEventSource)
  })
  afterEach(() => vi.unstubAllGlobals())

  it('follows status events on /api/takes/:id/events until the take is analysed, then settles once', async () => {
    const settled = vi.fn()
    const w = await mountSuspended(harness(7, { status: 'queued', progress: 0, error: null }, settled))
    await flushPromises()
    const es = FakeEventSource.all[0]!
    expect(es.url).toBe('/api/takes/7/events')
    expect(w.find('p').attributes('data-mode')).toBe('stream')
    es.emit('status', { status: 'analysing', progress: 0.5, error: null })
    await flushPromises()
    expect(w.text()).toBe('analysing 0.5')
    es.emit('status', { status: 'analysed', progress: 1, error: null })
    await flushPromises()
    expect(w.text()).toBe('analysed 1')
    expect(es.closed).toBe(true)
    expect(settled).toHaveBeenCalledTimes(1)
    expect(settled.mock.calls[0]![0]).toMatchObject({ status: 'analysed' })
  })

  it('falls back to polling GET /api/takes/:id when the stream fails', async () => {
    let calls = 0
    registerEndpoint('/api/takes/8', () => {
      calls++
      return calls < 2
        ? { id: 8, status: 'analysing', progress: 0.3, error: null }
        : { id: 8, status: 'failed', progress: 1, error: { code: 'no_holds', message: 'none found' } }
    })
    const settled = vi.fn()
    const w = await mountSuspended(harness(8, { status: 'queued', progress: 0, error: null }, settled))
    await flushPromises()
    FakeEventSource.all[0]!.onerror!()
    expect(FakeEventSource.all[0]!.closed).toBe(true)
    await vi.waitFor(() => expect(settled).toHaveBeenCalledTimes(1), { timeout: 5000 })
    expect(calls).toBe(2)
    expect(w.text()).toBe('failed 1')
    expect(settled.mock.calls[0]![0]).toMatchObject({ status: 'failed', error: { code: 'no_holds' } })
  })

  it('opens no stream for a take that is already analysed', async () => {
    const settled = vi.fn()
    await mountSuspended(harness(9, { status: 'analysed', progress: 1, error: null }, settled))
    await flushPromises()
    expect(FakeEventSource.all).toHaveLength(0)
    expect(settled).not.toHaveBeenCalled()
  })
})
