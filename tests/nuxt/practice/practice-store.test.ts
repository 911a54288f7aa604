import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { createPinia, setActivePinia } from 'pinia'
import {
  LIMITER_SETTINGS, PRACTICE_DEFAULT_VOLUME, PRACTICE_MAX_GAIN, buildOutputChain, usePracticeStore, volumeToGain,
} from '~/stores/practice'
import { FakeAudioContext, type FakeCompressor, type FakeGain, type FakeOscillator } from './audio-mock'

const dB = (g: number) => 20 * Math.log10(g)

describe('practice tone output chain', () => {
  beforeEach(() => {
    FakeAudioContext.instances = []
    vi.stubGlobal('AudioContext', FakeAudioContext)
    localStorage.clear()
    setActivePinia(createPinia())
  })
  afterEach(() => vi.unstubAllGlobals())

  it('starts at a conservative level: the default master gain is at most −15 dBFS', () => {
    // Conservative here means well below full scale before any tone plays (common practice for
    // headphone test tones: start low, let the listener raise it). 20·log10(gain) gives dBFS.
    const g = volumeToGain(PRACTICE_DEFAULT_VOLUME)
    expect(g).toBeGreaterThan(0)
    expect(dB(g)).toBeLessThanOrEqual(-15)
    // Even the top of the slider stays 6 dB under full scale.
    expect(dB(volumeToGain(1))).toBeCloseTo(dB(PRACTICE_MAX_GAIN), 10)
    expect(dB(PRACTICE_MAX_GAIN)).toBeLessThanOrEqual(-6)
    expect(volumeToGain(7)).toBe(PRACTICE_MAX_GAIN)
    expect(volumeToGain(-1)).toBe(0)
    expect(volumeToGain(Number.NaN)).toBe(volumeToGain(PRACTICE_DEFAULT_VOLUME))
  })

  it('builds master gain → limiter → destination with limiter settings', () => {
    const ctx = new FakeAudioContext()
    const { master, limiter } = buildOutputChain(ctx as unknown as BaseAudioContext, volumeToGain(PRACTICE_DEFAULT_VOLUME))
    const m = master as unknown as FakeGain
    const l = limiter as unknown as FakeCompressor
    expect(m.outputs).toEqual([l])
    expect(l.outputs).toEqual([ctx.destination])
    expect(m.gain.value).toBeCloseTo(volumeToGain(PRACTICE_DEFAULT_VOLUME), 12)
    // A compressor acts as a limiter with a high ratio (20:1 or more), a hard knee and a fast
    // attack, its threshold below 0 dBFS (common practice for limiting). The Web Audio spec
    // caps ratio at 20, knee at 0..40 dB, attack at 0..1 s.
    expect(l.ratio.value).toBe(20)
    expect(l.knee.value).toBe(0)
    expect(l.attack.value).toBeLessThanOrEqual(0.005)
    expect(l.threshold.value).toBeLessThan(0)
    expect(l.threshold.value).toBe(LIMITER_SETTINGS.threshold)
  })

  it('plays a chord at its exact target frequencies through that chain only', async () => {
    const store = usePracticeStore()
    // Just major triad on C4 at A4 = 440 Hz: C4 equal-tempered 261.6256 Hz, E4 at 5/4, G4 at 3/2
    // (4:5:6, common practice).
    const c4 = 440 * 2 ** (-9 / 12)
    const chord = [c4, c4 * 5 / 4, c4 * 3 / 2]
    await store.play(chord, { key: 'chord:0' })
    const ctx = FakeAudioContext.instances[0]!
    const oscs = ctx.of<FakeOscillator>('oscillator')
    expect(oscs.map(o => o.frequency.value)).toEqual(chord)
    const [master, ...envs] = ctx.of<FakeGain>('gain')
    const limiter = ctx.of<FakeCompressor>('compressor')[0]!
    expect(master!.gain.value).toBeCloseTo(volumeToGain(PRACTICE_DEFAULT_VOLUME), 12)
    for (const o of oscs) {
      const env = o.outputs[0] as unknown as FakeGain
      expect(envs).toContain(env)
      expect(env.outputs).toEqual([master])
    }
    expect(master!.outputs).toEqual([limiter])
    expect(limiter.outputs).toEqual([ctx.destination])
    // Nothing reaches the destination except through the limiter.
    const intoDestination = ctx.nodes.filter(n => n.outputs.includes(ctx.destination))
    expect(intoDestination).toEqual([limiter])
    // The voices share the headroom: their envelopes' peaks sum to at most 0.9 before the master gain.
    const sum = envs.reduce((s, e) => s + e.gain.peak(), 0)
    expect(sum).toBeLessThanOrEqual(0.9 + 1e-9)
    expect(store.activeKey).toBe('chord:0')
  })

  it('ramps every tone in and out (no clicks) and stops it', async () => {
    const store = usePracticeStore()
    await store.play([440], { durationS: 2 })
    const ctx = FakeAudioContext.instances[0]!
    const env = ctx.of<FakeGain>('gain')[1]!
    expect(env.gain.events[0]).toEqual(['set', 0, expect.any(Number)])
    expect(env.gain.events.at(-1)![0]).toBe('linear')
    expect(env.gain.events.at(-1)![1]).toBe(0)
    const osc = ctx.of<FakeOscillator>('oscillator')[0]!
    expect(osc.stopped! - osc.started!).toBeGreaterThanOrEqual(2)
  })

  it('changes the master gain with the volume, clamped to the maximum', async () => {
    const store = usePracticeStore()
    await store.play([440])
    store.setVolume(3)
    expect(store.volume).toBe(1)
    expect(store.inspect()!.gain).toBe(PRACTICE_MAX_GAIN)
    store.setVolume(0.1)
    expect(store.inspect()!.gain).toBeCloseTo(0.1 * PRACTICE_MAX_GAIN, 12)
    expect(localStorage.getItem('driftline.practice.volume')).toBe('0.1')
  })

  it('ignores frequencies that are not positive numbers (never an invented pitch)', async () => {
    const store = usePracticeStore()
    await store.play([Number.NaN, -3, 0, 220])
    const oscs = FakeAudioContext.instances[0]!.of<FakeOscillator>('oscillator')
    expect(oscs.map(o => o.frequency.value)).toEqual([220])
  })

  it('counts in at the tempo and starts the tones on the beat after the count-in', async () => {
    const store = usePracticeStore()
    const res = await store.countIn(4, 120, [{ atS: 0, durationS: 1, hz: [293.66] }, { atS: 1, durationS: 1, hz: [329.63] }])
    expect(res).not.toBeNull()
    // 4 beats at 120 bpm = 2 s (60/120 s per beat).
    expect(res!.firstChordAt - res!.startAt).toBeCloseTo(2, 12)
    const oscs = FakeAudioContext.instances[0]!.of<FakeOscillator>('oscillator')
    const clicks = oscs.filter(o => o.type === 'triangle')
    expect(clicks.map(o => o.started! - res!.startAt)).toEqual([0, 0.5, 1, 1.5].map(x => expect.closeTo(x, 12)))
    const tones = oscs.filter(o => o.type !== 'triangle')
    expect(tones.map(o => o.started! - res!.firstChordAt)).toEqual([expect.closeTo(0, 12), expect.closeTo(1, 12)])
  })

  it('says so when the browser has no Web Audio', async () => {
    vi.stubGlobal('AudioContext', undefined)
    const store = usePracticeStore()
    await store.play([440])
    expect(store.error).toMatch(/cannot play practice tones/)
  })
})
