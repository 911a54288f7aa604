// Drones, loops and weighted mixes go through the same capped, limited chain, and fade in and out.
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { createPinia, setActivePinia } from 'pinia'
import { DRONE_FADE_S, PRACTICE_MAX_GAIN, usePracticeStore } from '~/stores/practice'
import { FakeAudioContext, type FakeGain, type FakeOscillator } from './audio-mock'

describe('drones, loops and mixes', () => {
  beforeEach(() => {
    FakeAudioContext.instances = []
    vi.stubGlobal('AudioContext', FakeAudioContext)
    vi.useFakeTimers()
    localStorage.clear()
    setActivePinia(createPinia())
  })
  afterEach(() => {
    vi.useRealTimers()
    vi.unstubAllGlobals()
  })

  it('holds a drone with a slow fade in, fades it out on stop, through the master gain and limiter', async () => {
    const store = usePracticeStore()
    expect(await store.drone([130.81], 'tones:drone:tonic')).toBe(true)
    const ctx = FakeAudioContext.instances[0]!
    const [master, env] = ctx.of<FakeGain>('gain') as [FakeGain, FakeGain]
    expect(master.gain.value).toBeLessThanOrEqual(PRACTICE_MAX_GAIN)
    expect(env.outputs).toEqual([master])
    expect(master.outputs[0]!.kind).toBe('compressor')
    // Fade in: from 0 to the level over DRONE_FADE_S.
    const [set, ramp] = env.gain.events as [[string, number, number], [string, number, number]]
    expect(set.slice(0, 2)).toEqual(['set', 0])
    expect(ramp[0]).toBe('linear')
    expect(ramp[2] - set[2]).toBeCloseTo(DRONE_FADE_S, 9)
    expect(store.activeKey).toBe('tones:drone:tonic')

    store.stop()
    expect(env.gain.events.at(-1)![0]).toBe('target') // glides to 0, never cut
    expect(env.gain.events.at(-1)![1]).toBe(0)
    expect(store.activeKey).toBeNull()
  })

  it('repeats a looped chord on the audio clock until stopped', async () => {
    const store = usePracticeStore()
    await store.loop([{ atS: 0, durationS: 0.9, hz: [261.63, 329.63] }], 1, 'tones:loop:0')
    const ctx = FakeAudioContext.instances[0]!
    const started = () => ctx.of<FakeOscillator>('oscillator').map(o => o.started!)
    // Scheduled about 1.2 s ahead: turns at 0.05 s and 1.05 s, two notes each.
    expect(started()).toHaveLength(4)
    ctx.currentTime = 3
    vi.advanceTimersByTime(300)
    const turns = [...new Set(started().map(t => Math.round(t * 100) / 100))]
    expect(turns).toEqual([0.05, 1.05, 2.05, 3.05, 4.05])
    store.stop()
    ctx.currentTime = 10
    vi.advanceTimersByTime(1000)
    expect(started()).toHaveLength(10) // nothing more once stopped
  })

  it('weights the player\'s own part louder, and the chord still shares the same headroom', async () => {
    const store = usePracticeStore()
    await store.playSequence([{ atS: 0, durationS: 1, hz: [220, 330, 440], weights: [2, 1, 1] }])
    const envs = FakeAudioContext.instances[0]!.of<FakeGain>('gain').slice(1)
    const peaks = envs.map(e => e.gain.peak())
    expect(peaks[0]).toBeCloseTo(2 * peaks[1]!, 12)
    expect(peaks.reduce((a, b) => a + b, 0)).toBeCloseTo(0.9, 12) // never more than a plain chord
  })
})
