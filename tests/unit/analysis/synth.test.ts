// The synthetic takes the tests, the benchmark and the demo seed use: deterministic, at the
// frequency asked for, with the noise level asked for, and with a truth that means what it says.
import { describe, expect, it } from 'vitest'
import { PitchDetector } from 'pitchy'
import { harmonicAmplitude, mulberry32, synthTake, synthTakeWithTruth } from '../../../server/analysis/synth'

describe('synthTake', () => {
  it('is deterministic for a seed and differs between seeds', () => {
    const spec = { sampleRate: 16000, durationS: 1, holds: [{ startS: 0.1, endS: 0.9, hz: 220 }], timbre: 'voice-alto' as const, snrDb: 20, jitterCents: 2 }
    const a = synthTake({ ...spec, seed: 5 })
    const b = synthTake({ ...spec, seed: 5 })
    const c = synthTake({ ...spec, seed: 6 })
    expect(a).toEqual(b)
    expect(a).not.toEqual(c)
    expect(a.length).toBe(16000)
  })

  it('mulberry32 gives uniform values in [0, 1)', () => {
    const r = mulberry32(1)
    let s = 0
    for (let i = 0; i < 20000; i++) { const v = r(); expect(v).toBeGreaterThanOrEqual(0); expect(v).toBeLessThan(1); s += v }
    // Mean of 20 000 uniforms: 0.5 ± 0.002 (one SD = 1/√(12·20000)); 0.01 is five SDs.
    expect(Math.abs(s / 20000 - 0.5)).toBeLessThan(0.01)
  })

  it.each([55, 220, 880])('a steady %s Hz tone is at that frequency by pitchy (McLeod Pitch Method)', (hz) => {
    const sr = 44100
    const x = synthTake({ sampleRate: sr, durationS: 1.5, holds: [{ startS: 0.1, endS: 1.4, hz }], timbre: 'brass', settleCents: 0, seed: 2 })
    const det = PitchDetector.forFloat32Array(8192)
    const [f, clarity] = det.findPitch(x.subarray(22050, 22050 + 8192), sr)
    expect(clarity).toBeGreaterThan(0.95)
    // 8192-sample frames: pitchy's interpolated lag is good to well under a cent here.
    expect(Math.abs(1200 * Math.log2(f / hz))).toBeLessThan(1)
  })

  it('adds noise at the SNR asked for (±0.5 dB)', () => {
    const sr = 16000
    const spec = { sampleRate: sr, durationS: 3, holds: [{ startS: 0.2, endS: 2.8, hz: 196 }], timbre: 'voice-tenor' as const, seed: 3 }
    const clean = synthTake(spec)
    const noisy = synthTake({ ...spec, snrDb: 15 })
    let s = 0
    let n = 0
    // Steady part only (the SNR is defined against the held tone): 0.5–2.6 s.
    for (let i = Math.round(0.5 * sr); i < Math.round(2.6 * sr); i++) { s += clean[i]! ** 2; n += (noisy[i]! - clean[i]!) ** 2 }
    // The noise is stationary apart from a ±15 % slow modulation, so its power over a stretch
    // matches its power over the take to a fraction of a dB.
    expect(Math.abs(10 * Math.log10(s / n) - 15)).toBeLessThan(0.5)
  })

  it('with vibrato the truth window holds whole cycles and the centre is the nominal pitch', () => {
    const r = synthTakeWithTruth({ sampleRate: 16000, durationS: 3, holds: [{ startS: 0.2, endS: 2.8, hz: 300 }], timbre: 'sine', vibrato: { rateHz: 5.3, extentCents: 30 }, settleCents: 0, seed: 4 })
    const t = r.holds[0]!
    const cycles = (t.steadyEndS - t.steadyStartS) * 5.3
    expect(Math.abs(cycles - Math.round(cycles))).toBeLessThan(0.01)
    // The mean of a sinusoid over whole cycles is zero: the centre is 300 Hz (to the sampling
    // of the window's ends: < 0.05 ¢).
    expect(Math.abs(t.centreCents)).toBeLessThan(0.05)
  })

  it('a drifting hold has its truth at the mean of the drift over the window', () => {
    const r = synthTakeWithTruth({ sampleRate: 16000, durationS: 3, holds: [{ startS: 0.2, endS: 2.8, hz: 300, driftCentsPerS: -4 }], timbre: 'sine', settleCents: 0, seed: 4 })
    const t = r.holds[0]!
    // Linear drift from the onset: mean over [a, b] is −4·((a + b)/2 − onset) cents.
    const expected = -4 * ((t.steadyStartS + t.steadyEndS) / 2 - 0.2)
    expect(t.centreCents).toBeCloseTo(expected, 3)
  })

  it('voice spectra peak near the first formants, brass rises to a peak', () => {
    // An alto /a/ at 200 Hz: harmonic 4 (800 Hz, on F1) is stronger than harmonic 2 (400 Hz).
    expect(harmonicAmplitude('voice-alto', 200, 4)).toBeGreaterThan(harmonicAmplitude('voice-alto', 200, 2))
    // Brass at 100 Hz: amplitudes rise to about 500 Hz, then fall.
    const b = [1, 2, 3, 4, 5, 6, 8, 12].map(k => harmonicAmplitude('brass', 100, k))
    expect(b[0]!).toBeLessThan(b[2]!)
    expect(b[4]!).toBeGreaterThan(b[7]!)
    expect(harmonicAmplitude('sine', 100, 2)).toBe(0)
  })

  it('rejects a hold without a frequency or length', () => {
    expect(() => synthTake({ sampleRate: 8000, durationS: 1, holds: [{ startS: 0.5, endS: 0.4, hz: 100 }], timbre: 'sine' })).toThrow(RangeError)
    expect(() => synthTake({ sampleRate: 8000, durationS: 1, holds: [{ startS: 0.1, endS: 0.4, hz: 0 }], timbre: 'sine' })).toThrow(RangeError)
  })
})
