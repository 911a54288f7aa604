import { describe, expect, it, vi } from 'vitest'
import { flushPromises } from '@vue/test-utils'
import { mountSuspended } from '@nuxt/test-utils/runtime'
import { SWATCHES } from '#shared/deviation'
import type { ReportHold as TakeHold } from '#shared/types/take'

// wavesurfer.js needs a real browser (media element, canvas); a stand-in records what the
// component asks of it.
const mocks = vi.hoisted(() => {
  const regions: { id: string, start: number, end: number, color: string, content: string, play: (stop?: boolean) => void }[] = []
  const handlers: Record<string, ((...a: unknown[]) => void)[]> = {}
  const regionHandlers: Record<string, ((...a: unknown[]) => void)[]> = {}
  const played: [string, boolean | undefined][] = []
  const created: Record<string, unknown>[] = []
  const plugin = {
    addRegion: (o: { id: string, start: number, end: number, color: string, content: string }) => {
      const r = { ...o, play: (stop?: boolean) => { played.push([o.id, stop]) } }
      regions.push(r)
      return r
    },
    clearRegions: () => { regions.length = 0 },
    getRegions: () => regions,
    on: (ev: string, fn: (...a: unknown[]) => void) => { (regionHandlers[ev] ??= []).push(fn) },
  }
  return { regions, handlers, regionHandlers, played, created, plugin }
})

// Registered before the component is imported (a hoisted vi.mock stalls the Nuxt test setup).
function mockWavesurfer() {
  vi.doMock('wavesurfer.js', () => ({
    default: {
      create: (opts: Record<string, unknown>) => {
        mocks.created.push(opts)
        return {
          on: (ev: string, fn: (...a: unknown[]) => void) => { (mocks.handlers[ev] ??= []).push(fn) },
          playPause: vi.fn(),
          destroy: vi.fn(),
        }
      },
    },
  }))
  vi.doMock('wavesurfer.js/dist/plugins/regions.esm.js', () => ({ default: { create: () => mocks.plugin } }))
}

async function loadComponent() {
  mockWavesurfer()
  return (await import('~/components/takes/TakeWaveform.client.vue')).default
}

const holds: TakeHold[] = [
  { index: 0, note: 'E4', member: 'third', startS: 1, endS: 3, targetHz: 327.03, detectedHz: 331, centsFromTarget: 20.9, centsFromEqual: 7.2, spreadCents: 2, slopeCentsPerS: 0, confidence: 0.9, withinTolerance: false, reason: null },
  { index: 1, note: 'C4', member: 'root', startS: 3.5, endS: 6, targetHz: 261.63, detectedHz: 258, centsFromTarget: -24.2, centsFromEqual: -24.2, spreadCents: 2, slopeCentsPerS: 0, confidence: 0.9, withinTolerance: false, reason: null },
  { index: 2, note: 'G4', member: 'fifth', startS: 6.5, endS: 9, targetHz: 392.44, detectedHz: 392.5, centsFromTarget: 0.3, centsFromEqual: 2.2, spreadCents: 2, slopeCentsPerS: 0, confidence: 0.9, withinTolerance: true, reason: null },
  { index: 3, note: 'C5', member: 'root', startS: 9.5, endS: 12, targetHz: 523.25, detectedHz: null, centsFromTarget: null, centsFromEqual: null, spreadCents: null, slopeCentsPerS: null, confidence: null, withinTolerance: null, reason: 'no voiced audio' },
]

function rgba(hex: string, a: number) {
  const n = (i: number) => parseInt(hex.slice(i, i + 2), 16)
  return `rgba(${n(1)}, ${n(3)}, ${n(5)}, ${a})`
}

describe('TakeWaveform', () => {
  it('draws one region per hold, filled on the flat/sharp scale and labelled with the signed number', async () => {
    const TakeWaveform = await loadComponent()
    const w = await mountSuspended(TakeWaveform, { props: { audioUrl: '/takes/9/audio', holds, tolerance: 10 } })
    await flushPromises()
    expect(mocks.created[0]!.url).toBe('/takes/9/audio')
    mocks.handlers.decode!.forEach(fn => fn(12.5))
    await flushPromises()
    expect(mocks.regions.map(r => [r.id, r.start, r.end])).toEqual([['hold-0', 1, 3], ['hold-1', 3.5, 6], ['hold-2', 6.5, 9], ['hold-3', 9.5, 12]])
    // +20.9 ¢ at ±10 ¢ is sharp step 2 (2× to 4× the tolerance); −24.2 ¢ flat step 2 … as the shared scale says.
    expect(mocks.regions[0]!.color).toBe(rgba(SWATCHES['sharp-2'].fill, 0.45))
    expect(mocks.regions[1]!.color).toBe(rgba(SWATCHES['flat-2'].fill, 0.45))
    expect(mocks.regions[2]!.color).toBe(rgba(SWATCHES['in-tune'].fill, 0.45))
    expect(mocks.regions[3]!.color).toBe(rgba(SWATCHES.none.fill, 0.45))
    // Colour is never alone: each region carries its number, with a true minus.
    expect(mocks.regions.map(r => r.content)).toEqual(['1 · +20.9 ¢', '2 · \u221224.2 ¢', '3 · +0.3 ¢', '4 · no pitch'])
    expect(w.text()).toContain('0:12.5')
  })

  it('plays just the clicked hold, stopping at its end, and tells the page which one', async () => {
    const TakeWaveform = await loadComponent()
    const w = await mountSuspended(TakeWaveform, { props: { audioUrl: '/takes/9/audio', holds, tolerance: 10 } })
    await flushPromises()
    mocks.handlers.decode!.at(-1)!(12.5)
    await flushPromises()
    mocks.played.length = 0
    const region = mocks.regions[1]!
    mocks.regionHandlers['region-clicked']!.at(-1)!(region, { stopPropagation: () => {} })
    await flushPromises()
    expect(mocks.played).toEqual([['hold-1', true]])
    expect(w.emitted('select-hold')).toEqual([[1]])
    expect(w.text()).toContain('Playing hold 2')
    ;(w.vm as unknown as { playHold: (i: number) => void }).playHold(2)
    expect(mocks.played.at(-1)).toEqual(['hold-2', true])
  })
})
