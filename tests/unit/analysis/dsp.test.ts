// The decimation pyramid: the half-band filter's response, zero phase, alias-free band.
import { describe, expect, it } from 'vitest'
import { besselI0, decimate2, designHalfband, median, Pyramid, quantile } from '../../../server/analysis/dsp'

const { h0, c } = designHalfband()
// Frequency response of the symmetric half-band filter at f (cycles per input sample).
const H = (f: number) => h0 + c.reduce((s, v, p) => s + 2 * v * Math.cos(2 * Math.PI * f * (2 * p + 1)), 0)
const dB = (v: number) => 20 * Math.log10(Math.abs(v))

describe('half-band low-pass', () => {
  it('I0 matches its series at known points', () => {
    // I0(0) = 1, I0(1) = 1.2660658777520082 (Abramowitz & Stegun table 9.8, from memory).
    expect(besselI0(0)).toBe(1)
    expect(besselI0(1)).toBeCloseTo(1.2660658777520082, 12)
  })

  it('is a half-band filter: unit DC gain, −6.02 dB at a quarter of the rate', () => {
    // A half-band filter satisfies H(f) + H(0.5 − f) = 1, so H(0.25) = 0.5 (common practice).
    expect(H(0)).toBeCloseTo(1, 12)
    expect(H(0.25)).toBeCloseTo(0.5, 12)
    for (const f of [0.05, 0.1, 0.2, 0.24]) expect(H(f) + H(0.5 - f)).toBeCloseTo(1, 12)
  })

  it('pass band flat to 0.19·fs (±0.001 dB) and stop band ≥ 78 dB down from 0.31·fs', () => {
    // Kaiser window with β = 7.86 gives about 80 dB of stop-band attenuation (Kaiser's design
    // formula β = 0.1102·(A − 8.7), common practice); 47 taps put the transition in 0.19–0.31.
    for (let f = 0; f <= 0.19; f += 0.005) expect(Math.abs(dB(H(f)))).toBeLessThan(0.001)
    for (let f = 0.31; f <= 0.5; f += 0.0025) expect(dB(H(f))).toBeLessThan(-78)
  })

  it('decimate2 is zero-phase: output m is the input at 2m', () => {
    const n = 4000
    const x = new Float32Array(n)
    const f = 0.01 // cycles per input sample, deep in the pass band
    for (let i = 0; i < n; i++) x[i] = Math.sin(2 * Math.PI * f * i + 0.3)
    const y = decimate2(x)
    for (let m = 100; m < 1900; m += 97) expect(y[m]!).toBeCloseTo(Math.sin(2 * Math.PI * f * 2 * m + 0.3), 4)
  })

  it('a tone above the clean band of a level is removed, one inside it is kept', () => {
    const sr = 44100
    const x = new Float32Array(sr)
    for (let i = 0; i < sr; i++) x[i] = Math.sin(2 * Math.PI * 7000 * i / sr) + 0.5 * Math.sin(2 * Math.PI * 1500 * i / sr)
    const pyr = new Pyramid(x, sr)
    // Level 2 runs at 11025 Hz: 7 kHz would alias to 4025 Hz; its clean band is 0.38·11025 = 4190 Hz.
    expect(pyr.rate(2)).toBe(11025)
    expect(pyr.cleanBand(2)).toBeCloseTo(4189.5, 1)
    const y = pyr.level(2)
    // Least-squares fit of a 1.5-kHz sinusoid over 1000…10000: amplitude 0.5, and what is left
    // (the 7-kHz tone's alias at 4025 Hz, attenuated ≥ 78 dB: RMS ≤ 0.707·10^(−78/20) ≈ 9e-5)
    // is tiny.
    let ss = 0; let cc = 0; let sc = 0; let ys = 0; let yc = 0
    for (let i = 1000; i < 10000; i++) {
      const w = 2 * Math.PI * 1500 * i / 11025
      const sn = Math.sin(w); const cs = Math.cos(w)
      ss += sn * sn; cc += cs * cs; sc += sn * cs; ys += y[i]! * sn; yc += y[i]! * cs
    }
    const det = ss * cc - sc * sc
    const a = (ys * cc - yc * sc) / det
    const b = (yc * ss - ys * sc) / det
    expect(Math.hypot(a, b)).toBeCloseTo(0.5, 4)
    let r2 = 0
    for (let i = 1000; i < 10000; i++) {
      const w = 2 * Math.PI * 1500 * i / 11025
      r2 += (y[i]! - a * Math.sin(w) - b * Math.cos(w)) ** 2
    }
    expect(Math.sqrt(r2 / 9000)).toBeLessThan(2e-4)
  })

  it('picks the deepest level that still holds the band asked for', () => {
    const pyr = new Pyramid(new Float32Array(10), 48000)
    expect(pyr.pick(0, 3000)).toBe(2) // 12 kHz: clean to 4560 Hz; 6 kHz would give only 2280
    expect(pyr.pick(2000)).toBe(4) // 3000 Hz ≥ 2000, 1500 < 2000
    expect(pyr.pick(0, 30000)).toBe(0)
  })
})

describe('robust statistics helpers', () => {
  it('median and quantile ignore non-finite values', () => {
    expect(median([3, NaN, 1, Infinity, 2])).toBe(2)
    expect(median([4, 1, 3, 2])).toBe(2.5)
    expect(Number.isNaN(median([NaN]))).toBe(true)
    expect(quantile([0, 10, 20, 30, 40], 0.25)).toBe(10)
    expect(quantile([0, 10], 0.5)).toBe(5)
  })
})
