// Hold centres of synthesised tones of known frequency, measured by the engine and, as a second
// published method, by the McLeod Pitch Method of the `pitchy` package (npm registry).
import { describe, expect, it } from 'vitest'
import { PitchDetector } from 'pitchy'
import { measureTake } from '../../../server/analysis/measure'
import { synthTakeWithTruth } from '../../../server/analysis/synth'
import type { SynthTimbre } from '../../../server/analysis/synth'
import { audioOf, cents } from './helpers'

// One 2.5-s hold of `hz` in a 3.6-s take; the drill expects the nearest equal-tempered note.
function oneHold (hz: number, timbre: SynthTimbre, opts: { snrDb?: number, vibrato?: { rateHz: number, extentCents: number }, jitterCents?: number, driftCentsPerS?: number, sampleRate?: number, seed?: number } = {}) {
  const sr = opts.sampleRate ?? 44100
  const syn = synthTakeWithTruth({
    sampleRate: sr, durationS: 3.6, timbre, seed: opts.seed ?? 3,
    holds: [{ startS: 0.6, endS: 3.1, hz, driftCentsPerS: opts.driftCentsPerS ?? 0 }],
    snrDb: opts.snrDb ?? 40,
    ...(opts.vibrato ? { vibrato: opts.vibrato } : {}),
    ...(opts.jitterCents ? { jitterCents: opts.jitterCents } : {}),
  })
  const midi = Math.round(69 + 12 * Math.log2(hz / 440))
  const expectedHz = 440 * Math.pow(2, (midi - 69) / 12)
  const m = measureTake(audioOf(syn.samples, sr), [{ index: 0, startS: 0, endS: 3, midi, expectedHz }])
  return { hold: m.holds[0]!, truth: syn.holds[0]!, samples: syn.samples, sr }
}

// Median of pitchy's frame estimates (clarity ≥ 0.9) over the truth's steady window.
function pitchyCentre (samples: Float32Array, sr: number, a: number, b: number, hz: number): number {
  // Frames of at least four periods (pitchy, like any lag method, needs two or more).
  let n = 2048
  while (n < 4 * sr / hz) n *= 2
  const det = PitchDetector.forFloat32Array(n)
  const est: number[] = []
  for (let s = Math.round(a * sr); s + n <= Math.round(b * sr); s += n >> 2) {
    const [f, clarity] = det.findPitch(samples.subarray(s, s + n), sr)
    if (clarity >= 0.9) est.push(f)
  }
  est.sort((p, q) => p - q)
  return est[est.length >> 1]!
}

describe('hold centre of steady tones across the range (29 Hz – 1.6 kHz)', () => {
  // Tuba pedal to piccolo trumpet / soprano. Tolerance 0.05 ¢: the Cramér–Rao bound for the
  // frequency of a tone at 40 dB SNR over ~2 s is below 0.001 ¢ (Rife & Boorstyn 1974, from
  // memory), so 0.05 ¢ leaves ample room for windowing and still tests sub-cent precision.
  const cases: Array<[number, SynthTimbre]> = [
    [29.135, 'brass'], [55, 'brass'], [110, 'voice-bass'], [220, 'voice-tenor'],
    [440, 'voice-alto'], [880, 'voice-soprano'], [1600, 'brass'], [1600, 'sine'], [29.135, 'sine'],
  ]
  it.each(cases)('%s Hz (%s) within 0.05 ¢ of the truth', (hz, timbre) => {
    const { hold, truth } = oneHold(hz * Math.pow(2, 7 / 1200), timbre)
    expect(hold.detectedHz).not.toBeNull()
    expect(Math.abs(cents(hold.detectedHz!, truth.centreHz))).toBeLessThan(0.05)
    expect(hold.confidence).toBeGreaterThan(0.8)
  })

  it.each([[110, 'voice-bass'], [440, 'voice-alto'], [1600, 'brass']] as Array<[number, SynthTimbre]>)(
    'agrees with pitchy (McLeod Pitch Method) at %s Hz (%s) within 1 ¢', (hz, timbre) => {
      const { hold, truth, samples, sr } = oneHold(hz * Math.pow(2, -4 / 1200), timbre)
      const mpm = pitchyCentre(samples, sr, truth.steadyStartS, truth.steadyEndS, hz)
      // pitchy's parabolic peak interpolation is good to a few tenths of a cent on clean tones.
      expect(Math.abs(cents(mpm, truth.centreHz))).toBeLessThan(1)
      expect(Math.abs(cents(hold.detectedHz!, mpm))).toBeLessThan(1)
    })
})

describe('hold centre with vibrato, noise, drift', () => {
  it('±30 ¢ vibrato at 5.5 Hz: centre within 0.5 ¢, rate and extent recovered', () => {
    const { hold, truth } = oneHold(220, 'voice-tenor', { snrDb: 30, vibrato: { rateHz: 5.5, extentCents: 30 } })
    // 0.5 ¢ is the product's target for ±30 ¢ vibrato; the truth averages whole cycles.
    expect(Math.abs(cents(hold.detectedHz!, truth.centreHz))).toBeLessThan(0.5)
    expect(hold.vibrato).not.toBeNull()
    expect(hold.vibrato!.rateHz).toBeGreaterThan(5.4)
    expect(hold.vibrato!.rateHz).toBeLessThan(5.6)
    expect(hold.vibrato!.extentCents).toBeGreaterThan(27)
    expect(hold.vibrato!.extentCents).toBeLessThan(33)
  })

  it('no vibrato is reported for a steady tone', () => {
    expect(oneHold(330, 'voice-alto').hold.vibrato).toBeNull()
  })

  it.each([[20, 0.3], [10, 1]])('breath noise at %s dB SNR: centre within %s ¢', (snrDb, tol) => {
    // Tolerances are the product's targets at 20 dB (0.3 ¢) and a looser one at 10 dB.
    for (const seed of [1, 2, 3]) {
      const { hold, truth } = oneHold(261.63, 'voice-alto', { snrDb, seed })
      expect(Math.abs(cents(hold.detectedHz!, truth.centreHz))).toBeLessThan(tol)
    }
  })

  it('a sagging hold: slope within 0.5 ¢/s of −4 ¢/s and the centre still right', () => {
    const { hold, truth } = oneHold(196, 'voice-tenor', { driftCentsPerS: -4, snrDb: 35 })
    expect(hold.slopeCentsPerS!).toBeGreaterThan(-4.5)
    expect(hold.slopeCentsPerS!).toBeLessThan(-3.5)
    // The centre is the mean over the engine's window; with −4 ¢/s a window shifted by 50 ms
    // moves it by 0.2 ¢ — hence 0.3 ¢.
    expect(Math.abs(cents(hold.detectedHz!, truth.centreHz))).toBeLessThan(0.3)
  })

  it('a settling transient of 15 ¢ at the onset does not move the centre by more than 0.1 ¢', () => {
    const syn = synthTakeWithTruth({ sampleRate: 44100, durationS: 3.6, timbre: 'brass', seed: 5, holds: [{ startS: 0.6, endS: 3.1, hz: 233.08 }], snrDb: 40, settleCents: 15 })
    const m = measureTake(audioOf(syn.samples, 44100), [{ index: 0, startS: 0, endS: 3, midi: 58, expectedHz: 233.08 }])
    expect(Math.abs(cents(m.holds[0]!.detectedHz!, syn.holds[0]!.centreHz))).toBeLessThan(0.1)
  })

  it('a few cents of slow wobble: spread is reported in the cents range of the wobble', () => {
    const { hold, truth } = oneHold(293.66, 'voice-alto', { jitterCents: 3, snrDb: 35 })
    expect(hold.spreadCents!).toBeGreaterThan(1)
    expect(hold.spreadCents!).toBeLessThan(5)
    expect(Math.abs(cents(hold.detectedHz!, truth.centreHz))).toBeLessThan(0.5)
  })
})
