// Pitch tracking in two stages.
// 1. Coarse: pitchfinder's YIN on a decimated copy of the take (rate a few times the highest
//    expected note, frames long enough for an octave below the lowest), with an energy gate.
//    It only has to be right to a fraction of a semitone: it drives voicing and alignment.
// 2. Fine: per hold, harmonic phase tracking. Each frame is demodulated at k·f for the first K
//    harmonics with a zero-phase Hann window, so the phase of every harmonic at the frame
//    centre is measured without bias; the phase advance between frames gives each harmonic's
//    frequency, and an inverse-variance combination across harmonics gives f0. The mean of
//    such a track over a steady stretch telescopes to (total phase advance)/(elapsed time),
//    which is why the precision reaches a small fraction of a cent with no bias that grows
//    with pitch.
import { YIN } from 'pitchfinder'
import { Pyramid, median } from './dsp'

export interface CoarseTrack {
  /** Frame spacing, seconds. */
  hopS: number
  /** Frame centre times, seconds. */
  times: Float64Array
  /** YIN's pitch per frame in Hz (0 where none was found or the frame is below the gate). */
  hz: Float64Array
  /** Mean square of the frame at the coarse rate. */
  energy: Float64Array
  /** Energy gate used for voicing (mean square). */
  gate: number
  /** 1 where the frame is above the gate and YIN found a pitch. */
  voiced: Uint8Array
  /** Rate (Hz) the coarse track ran at. */
  rate: number
  /** Lowest pitch the frames can reach, Hz. */
  reachHz: number
}

export interface CoarseOptions {
  /** Lowest and highest expected notes, Hz. */
  minHz: number
  maxHz: number
  /** Frame spacing, seconds (default 0.03). */
  hopS?: number
}

/** Next power of two ≥ n. */
function pow2 (n: number): number {
  let p = 1
  while (p < n) p *= 2
  return p
}

/**
 * Coarse f0 track of a whole take for one band of expected notes (at most ~an octave wide).
 *
 * pitchfinder's YIN is used with care: the take is decimated to ≥ 5 samples per period of the
 * band's highest note, low-passed (4th order at 1.35× that note) so a strong formant-boosted
 * upper harmonic cannot win over the fundamental, and every frame is scaled to unit level
 * (pitchfinder's cumulative-mean step starts from a constant 1, so quiet frames otherwise
 * pass its threshold at tiny lags). Frames reach an octave below the band's lowest note, so a
 * part sung an octave low is recognised as such. Checked on voice and brass spectra at
 * 10–25 dB SNR: no frames off by anything but an octave at 25 dB, ~1.6 % at 10 dB.
 */
export function coarseTrack (pyr: Pyramid, opts: CoarseOptions): CoarseTrack {
  const hopS = opts.hopS ?? 0.03
  const level = pyr.pick(5 * opts.maxHz)
  const r = pyr.rate(level)
  const cutoff = Math.min(0.4 * r, 1.35 * opts.maxHz)
  const x = lowpass2(lowpass2(pyr.level(level), r, cutoff), r, cutoff)
  let reachHz = opts.minHz / 2 / 1.08
  if (1.15 * r / reachHz > 1024) reachHz = opts.minHz / Math.pow(2, 4 / 12)
  const half = pow2(Math.ceil(1.15 * r / reachHz))
  const W = 2 * half
  const durationS = pyr.level(0).length / pyr.sampleRate
  const nFrames = Math.max(0, Math.floor(durationS / hopS))
  const times = new Float64Array(nFrames)
  const hz = new Float64Array(nFrames)
  const energy = new Float64Array(nFrames)
  const voiced = new Uint8Array(nFrames)
  // Prefix sums of squares give each frame's energy in O(1).
  const cum = new Float64Array(x.length + 1)
  for (let i = 0; i < x.length; i++) cum[i + 1] = cum[i]! + x[i]! * x[i]!
  for (let j = 0; j < nFrames; j++) {
    const t = (j + 0.5) * hopS
    times[j] = t
    const c = Math.round(t * r)
    const a = Math.max(0, Math.min(x.length, c - half))
    const b = Math.max(0, Math.min(x.length, c + half))
    energy[j] = b > a ? (cum[b]! - cum[a]!) / (b - a) : 0
  }
  const gate = energyGate(energy)
  const detect = YIN({ sampleRate: r, threshold: 0.2, probabilityThreshold: 0 })
  const buf = new Float32Array(W + 1)
  for (let j = 0; j < nFrames; j++) {
    if (!(energy[j]! > gate)) continue
    const c = Math.round(times[j]! * r)
    const a = c - half
    if (a < 0 || a + W + 1 > x.length) continue
    // W + 1 samples: pitchfinder's YIN uses the largest power of two below the length.
    const g = 1 / Math.sqrt(energy[j]!)
    for (let i = 0; i <= W; i++) buf[i] = x[a + i]! * g
    const f = detect(buf)
    if (f !== null && Number.isFinite(f) && f > 0) {
      hz[j] = f
      voiced[j] = 1
    }
  }
  return { hopS, times, hz, energy, gate, voiced, rate: r, reachHz }
}

/** Groups expected note frequencies into bands no wider than ×1.9 (one coarse track each). */
export function noteBands (notesHz: number[]): Array<{ minHz: number, maxHz: number }> {
  const sorted = [...new Set(notesHz)].sort((p, q) => p - q)
  const bands: Array<{ minHz: number, maxHz: number }> = []
  for (const f of sorted) {
    const last = bands[bands.length - 1]
    if (last && f <= last.minHz * 1.9) last.maxHz = f
    else bands.push({ minHz: f, maxHz: f })
  }
  return bands
}

/** Second-order Butterworth low-pass (bilinear transform), one pass. */
export function lowpass2 (x: Float32Array, rate: number, cutoff: number): Float32Array {
  const K = Math.tan(Math.PI * cutoff / rate)
  const q = Math.SQRT1_2
  const norm = 1 / (1 + K / q + K * K)
  const b0 = K * K * norm
  const b1 = 2 * b0
  const a1 = 2 * (K * K - 1) * norm
  const a2 = (1 - K / q + K * K) * norm
  const y = new Float32Array(x.length)
  let x1 = 0
  let x2 = 0
  let y1 = 0
  let y2 = 0
  for (let i = 0; i < x.length; i++) {
    const xi = x[i]!
    const v = b0 * (xi + x2) + b1 * x1 - a1 * y1 - a2 * y2
    x2 = x1; x1 = xi; y2 = y1; y1 = v
    y[i] = v
  }
  return y
}

/**
 * Energy gate for voicing: a few dB above the quiet frames of the take (lead-in, breaths),
 * but never above −20 dB from the loud frames (a take without pauses), never below −60 dB.
 */
export function energyGate (energy: Float64Array): number {
  const sorted = Float64Array.from(energy).sort()
  if (sorted.length === 0) return Infinity
  const q = (p: number) => sorted[Math.min(sorted.length - 1, Math.floor(p * (sorted.length - 1)))]!
  const floor = q(0.05)
  const loud = q(0.98)
  if (!(loud > 0)) return Infinity
  return Math.max(Math.min(floor * 3, loud * 0.01), loud * 1e-6)
}

export interface RefineOptions {
  /** Largest number of harmonics (default 10; fewer at high pitch). */
  maxHarmonics?: number
  /** A part inside a sounding chord: frames of 16 periods (the part's harmonics apart from the
   *  other parts' partials), and a frame's harmonic share is the power at the part's harmonics
   *  against the power half-way between them (the other parts fill the rest of the spectrum). */
  chord?: boolean
  /** Harmonics (index k−1) to leave out: in a chord, those another part's partials sound on. */
  skip?: boolean[]
}

export interface RefinedTrack {
  /** Interval mid-times (s) and f0 per interval (Hz; NaN where unusable). */
  times: Float64Array
  hz: Float64Array
  /** Estimated variance of each interval's f0 (Hz²; Infinity where unusable). */
  varHz: Float64Array
  /** Harmonic share of each interval's frames (0–1; the lower of its two frames). */
  harmonicity: Float64Array
  /** Mean square level of each interval's frames at the analysis rate. */
  level: Float64Array
  /** Mean power of each harmonic k = 1…K over the voiced frames. */
  harmonicPower: Float64Array
  /** 1 for each harmonic k = 1…K whose phase advance was coherent enough to be used (a harmonic the tone really has). */
  coherent: Uint8Array
  /** Analysis rate, frame length, hop and the span each interval's f0 averages over (s), harmonics used, demodulation frequency. */
  rate: number
  frameS: number
  hopS: number
  spanS: number
  harmonics: number
  refHz: number
  /** Every harmonic between neighbouring frames: interval m of harmonic k at k·n + m (n = partials.times.length). */
  partials: Partials
}

export interface Partials {
  /** Interval mid-times (s), harmonic share and level of each interval (as for the track). */
  times: Float64Array
  harmonicity: Float64Array
  level: Float64Array
  /** f0 that harmonic k gives over interval m (Hz; NaN where the harmonic is unusable there). */
  f0: Float64Array
  /** |X_m|·|X_m+L| of the harmonic over the interval: its power there. */
  power: Float64Array
  /** Phase advance of the harmonic over the interval against the track's prediction, radians (wrapped). */
  dev: Float64Array
  /** (|X_m|² + |X_m+L|²)/2: with `power`, how much the harmonic's level changes over the interval. */
  meanPower: Float64Array
  /** Time the interval spans, seconds (the lag of the phase advance). */
  lagS: number
}

const TWO_PI = 2 * Math.PI

function wrap (p: number): number {
  return p - TWO_PI * Math.round(p / TWO_PI)
}

/** Harmonic-phase f0 track between startS and endS for a tone near refHz. */
export function refinePitch (pyr: Pyramid, startS: number, endS: number, refHz: number, opts: RefineOptions = {}): RefinedTrack {
  // Harmonics: up to 10 (and below 5 kHz), at the deepest level that still holds at least 6 of
  // them (or all of them when fewer are wanted): cost falls with the rate, precision hardly.
  const maxK = opts.maxHarmonics ?? 10
  const want = Math.max(1, Math.min(maxK, Math.floor(5000 / refHz)))
  const level = pyr.pick(0, Math.min(want, 6) * refHz * 1.05)
  const K = Math.max(1, Math.min(want, Math.floor(pyr.cleanBand(level) / (refHz * 1.05))))
  const r = pyr.rate(level)
  const x = pyr.level(level)
  const P = r / refHz
  // Frames of 2M+1 ≈ 3 periods (at least 6 ms, so high notes do not make thousands of frames a
  // second), hop M: between frames harmonic k may stray ±r/(2Hk) from the prediction.
  const span = Math.max((opts.chord ? 8 : 1.5) * P, 0.003 * r)
  const M = Math.max(4, Math.round(span))
  // In a chord the long frames overlap more, so the track keeps a point every few tens of ms.
  const H = Math.max(1, Math.round(opts.chord ? span / 4 : span))
  const first = Math.max(M, Math.ceil(startS * r) + M)
  const last = Math.min(x.length - 1 - M, Math.floor(endS * r) - M)
  const nF = last >= first ? Math.floor((last - first) / H) + 1 : 0

  // Zero-phase kernels, folded: X_k = Σ_n w·cos(θkn)·(x[c+n]+x[c−n]) − i·Σ_n w·sin(θkn)·(x[c+n]−x[c−n]).
  const win = new Float64Array(M + 1)
  let sumW = 0
  let sumW2 = 0
  for (let n = 0; n <= M; n++) {
    win[n] = 0.5 + 0.5 * Math.cos(Math.PI * n / (M + 1))
    const m2 = n === 0 ? 1 : 2
    sumW += m2 * win[n]!
    sumW2 += m2 * win[n]! * win[n]!
  }
  // Harmonics above K up to the level's Nyquist are demodulated for their energy only: the
  // harmonic share of a frame (voicing) must count every harmonic in the band, or a voice whose
  // formant lifts the 8th harmonic would look unvoiced.
  const Kall = Math.max(K, Math.min(K + 8, Math.floor(0.48 * r / refHz)))
  // In a chord, probes half-way between the harmonics ((q + 1.5)·f) follow the kernels.
  const nProbe = opts.chord ? 2 * Kall : Kall
  const kc = new Float64Array(nProbe * (M + 1))
  const ks = new Float64Array(nProbe * (M + 1))
  for (let q = 0; q < nProbe; q++) {
    const th = TWO_PI * (q < Kall ? q + 1 : q - Kall + 1.5) * refHz / r
    for (let n = 0; n <= M; n++) {
      kc[q * (M + 1) + n] = win[n]! * Math.cos(th * n)
      ks[q * (M + 1) + n] = win[n]! * Math.sin(th * n)
    }
  }
  const re = new Float64Array(K * nF)
  const im = new Float64Array(K * nF)
  const pow = new Float64Array(K * nF)
  const frameLevel = new Float64Array(nF)
  const frameHarm = new Float64Array(nF)
  const ev = new Float64Array(M + 1)
  const od = new Float64Array(M + 1)
  const compScale = 2 / (sumW * sumW)
  for (let f = 0; f < nF; f++) {
    const c = first + f * H
    const x0 = x[c]!
    ev[0] = x0
    od[0] = 0
    let e2 = win[0]! * win[0]! * x0 * x0
    for (let n = 1; n <= M; n++) {
      const a = x[c + n]!
      const b = x[c - n]!
      ev[n] = a + b
      od[n] = a - b
      const w2 = win[n]! * win[n]!
      e2 += w2 * (a * a + b * b)
    }
    const framePower = e2 / sumW2
    frameLevel[f] = framePower
    let harm = 0
    let between = 0
    for (let q = 0; q < nProbe; q++) {
      const base = q * (M + 1)
      let sr = 0
      let si = 0
      for (let n = 0; n <= M; n++) {
        sr += kc[base + n]! * ev[n]!
        si -= ks[base + n]! * od[n]!
      }
      const p = sr * sr + si * si
      if (q >= Kall) { between += p; continue }
      harm += p * compScale
      if (q < K) {
        re[q * nF + f] = sr
        im[q * nF + f] = si
        pow[q * nF + f] = p
      }
    }
    if (opts.chord) frameHarm[f] = harm > 0 ? harm / (harm + between * compScale) : 0
    else frameHarm[f] = framePower > 0 ? Math.min(1, harm / framePower) : 0
  }

  const harmonicPower = new Float64Array(K)
  let voicedFrames = 0
  for (let f = 0; f < nF; f++) {
    if (frameHarm[f]! < 0.5) continue
    voicedFrames++
    for (let k = 0; k < K; k++) harmonicPower[k]! += pow[k * nF + f]! * compScale
  }
  if (voicedFrames > 0) for (let k = 0; k < K; k++) harmonicPower[k]! /= voicedFrames

  // Phase advance of every harmonic between frames `lag` apart, and its quality
  // q = 1/(1/|X_m|² + 1/|X_m+lag|²) (the phase-difference noise variance is ∝ 1/q).
  // Neighbouring frames overlap, so their noise is correlated and pulls the advance towards the
  // demodulation frequency; the final pass therefore compares frames that do not overlap.
  const L = Math.max(1, Math.ceil((2 * M + 1) / H))
  interface Lag { lag: number, n: number, dphi: Float64Array, qual: Float64Array, qTyp: Float64Array, harm: Float64Array }
  const makeLag = (lag: number): Lag => {
    const n = Math.max(0, nF - lag)
    const dphi = new Float64Array(K * n)
    const qual = new Float64Array(K * n)
    const harm = new Float64Array(n)
    for (let m = 0; m < n; m++) harm[m] = Math.min(frameHarm[m]!, frameHarm[m + lag]!)
    const qTyp = new Float64Array(K)
    for (let k = 0; k < K; k++) {
      for (let m = 0; m < n; m++) {
        const i0 = k * nF + m
        const i1 = i0 + lag
        const zr = re[i1]! * re[i0]! + im[i1]! * im[i0]!
        const zi = im[i1]! * re[i0]! - re[i1]! * im[i0]!
        dphi[k * n + m] = Math.atan2(zi, zr)
        const p0 = pow[i0]!
        const p1 = pow[i1]!
        qual[k * n + m] = p0 > 0 && p1 > 0 ? (p0 * p1) / (p0 + p1) : 0
      }
      const qk = median(qual.subarray(k * n, (k + 1) * n))
      qTyp[k] = Number.isFinite(qk) ? qk : 0
    }
    return { lag, n, dphi, qual, qTyp, harm }
  }
  const lag1 = makeLag(1)
  const lagL = L === 1 ? lag1 : makeLag(L)

  const noise = new Float64Array(K).fill(1)
  const skip = (k: number) => opts.skip?.[k] === true
  const active = Uint8Array.from({ length: K }, (_, k) => (skip(k) ? 0 : 1))
  const scale = r / (TWO_PI * H)
  // Weights are fixed per harmonic (k²·typical q/noise), not per interval: the mean of a track
  // whose weights do not move telescopes to the end-point phases, which keeps the hold centre
  // unbiased at low SNR. An interval whose q is far below the harmonic's typical q is skipped.
  const estimate = (d: Lag, k: number, m: number, fp: number): number => {
    const kk = k + 1
    const dev = wrap(d.dphi[k * d.n + m]! - TWO_PI * kk * fp * d.lag / (r / H))
    return fp + dev * scale / (kk * d.lag)
  }
  const usable = (d: Lag, k: number, m: number) => active[k] === 1 && d.qTyp[k]! > 0 && d.qual[k * d.n + m]! > 0.05 * d.qTyp[k]!
  // One combination pass: unwrap each harmonic against `pred`, combine with weights k²·q/noise_k,
  // optionally dropping a harmonic that slipped a cycle or is masked (> 4σ from the rest).
  const combine = (d: Lag, kMax: number, pred: (m: number) => number, out: Float64Array, outVar: Float64Array | null, reject: boolean) => {
    const e = new Float64Array(kMax)
    const w = new Float64Array(kMax)
    for (let m = 0; m < d.n; m++) {
      const fp = pred(m)
      if (!Number.isFinite(fp)) { out[m] = NaN; continue }
      let sw = 0
      let swf = 0
      for (let k = 0; k < kMax; k++) {
        w[k] = 0
        if (!usable(d, k, m)) continue
        const kk = k + 1
        e[k] = estimate(d, k, m, fp)
        w[k] = kk * kk * d.lag * d.lag * d.qTyp[k]! / noise[k]!
        sw += w[k]!
        swf += w[k]! * e[k]!
      }
      let f = sw > 0 ? swf / sw : NaN
      if (reject && sw > 0 && kMax > 1) {
        let sw2 = 0
        let swf2 = 0
        for (let k = 0; k < kMax; k++) {
          if (!(w[k]! > 0)) continue
          const dd = e[k]! - f
          if (dd * dd * w[k]! > 16) continue
          sw2 += w[k]!
          swf2 += w[k]! * e[k]!
        }
        if (sw2 > 0) { f = swf2 / sw2; sw = sw2 }
      }
      out[m] = f
      if (outVar) outVar[m] = sw > 0 ? 1 / sw : Infinity
    }
  }
  // A harmonic whose phase advance is not concentrated around the prediction is noise (absent
  // or masked): its wrapped estimates would pull the track towards the prediction, so it is
  // left out. Mean resultant length ≥ 0.85 ⇔ phase-difference noise below about 0.57 rad.
  const selectHarmonics = (d: Lag, pred: (m: number) => number) => {
    let any = false
    for (let k = 0; k < K; k++) {
      const kk = k + 1
      let cr = 0
      let ci = 0
      let n = 0
      for (let m = 0; m < d.n; m++) {
        const fp = pred(m)
        if (d.harm[m]! < 0.5 || !Number.isFinite(fp) || !(d.qual[k * d.n + m]! > 0)) continue
        const dev = d.dphi[k * d.n + m]! - TWO_PI * kk * fp * d.lag / (r / H)
        cr += Math.cos(dev)
        ci += Math.sin(dev)
        n++
      }
      active[k] = !skip(k) && n >= 3 && Math.hypot(cr, ci) / n >= 0.85 ? 1 : 0
      if (active[k]) any = true
    }
    if (!any) {
      // Nothing is clean: keep the strongest harmonic so the caller can judge the result.
      let best = -1
      for (let k = 0; k < K; k++) if (!skip(k) && (best < 0 || harmonicPower[k]! > harmonicPower[best]!)) best = k
      if (best < 0) best = 0
      active[best] = 1
    }
  }
  // Noise per harmonic from residuals against a reference track (robust: median of z²/0.455).
  const estimateNoise = (d: Lag, pred: (m: number) => number, ref: Float64Array) => {
    const z2 = new Float64Array(d.n)
    for (let k = 0; k < K; k++) {
      const kk = k + 1
      let nz = 0
      for (let m = 0; m < d.n; m++) {
        if (!usable(d, k, m) || d.harm[m]! < 0.5 || !Number.isFinite(ref[m]!)) continue
        const dd = estimate(d, k, m, pred(m)) - ref[m]!
        z2[nz++] = dd * dd * kk * kk * d.lag * d.lag * d.qTyp[k]!
      }
      const med = median(z2.subarray(0, nz))
      noise[k] = Number.isFinite(med) && med > 0 ? med / 0.455 : 1
    }
  }

  // Pass A: low harmonics against the reference frequency (they tolerate the largest error):
  // those whose unambiguous range ±r/(2Hk) spans at least ±10 % of f (±165 ¢).
  const kA = Math.max(1, Math.min(K, 4, Math.floor(r / (2 * H * refHz * 0.1))))
  const fA = new Float64Array(lag1.n)
  combine(lag1, kA, () => refHz, fA, null, false)
  const fAs = smoothMedian(fA, 5, refHz)
  // Pass B: all clean harmonics against pass A.
  selectHarmonics(lag1, m => fAs[m]!)
  const fB = new Float64Array(lag1.n)
  combine(lag1, K, m => fAs[m]!, fB, null, false)
  const fBs = smoothMedian(fB, 3, refHz)
  // Final pass on non-overlapping frames, predicted by pass B averaged over the same span.
  const cumB = new Float64Array(lag1.n + 1)
  for (let m = 0; m < lag1.n; m++) cumB[m + 1] = cumB[m]! + fBs[m]!
  const predL = (m: number) => (cumB[Math.min(lag1.n, m + L)]! - cumB[m]!) / (Math.min(lag1.n, m + L) - m)
  selectHarmonics(lagL, predL)
  const fC = new Float64Array(lagL.n)
  combine(lagL, K, predL, fC, null, true)
  estimateNoise(lagL, predL, fC)
  const fD = new Float64Array(lagL.n)
  const vD = new Float64Array(lagL.n)
  combine(lagL, K, predL, fD, vD, true)
  // Output: every lag-L span (consecutive spans overlap; the mean over the track still
  // telescopes, to L end-point phases at each end).
  const nI = lagL.n
  const times = new Float64Array(nI)
  const hz = new Float64Array(nI)
  const varHz = new Float64Array(nI)
  const levelI = new Float64Array(nI)
  const harmonicity = lagL.harm
  for (let m = 0; m < nI; m++) {
    times[m] = (first + m * H + L * H / 2) / r
    levelI[m] = Math.min(frameLevel[m]!, frameLevel[m + L]!)
    const f = fD[m]!
    hz[m] = f > 0 && Number.isFinite(f) ? f : NaN
    varHz[m] = f > 0 && Number.isFinite(f) ? vD[m]! : Infinity
  }

  // Per-harmonic detail between neighbouring frames (a short lag, so a harmonic of a section
  // whose voices spread by tens of cents still advances less than half a turn): a part sung by
  // several voices is measured from each harmonic's power-weighted frequency (its spectral
  // centroid), which beats do not pull towards the loudest voice.
  const n1 = lag1.n
  const pf0 = new Float64Array(K * n1).fill(NaN)
  const ppow = new Float64Array(K * n1)
  const pdev = new Float64Array(K * n1)
  const pmean = new Float64Array(K * n1)
  const ptimes = new Float64Array(n1)
  const plevel = new Float64Array(n1)
  for (let m = 0; m < n1; m++) {
    ptimes[m] = (first + m * H + H / 2) / r
    plevel[m] = Math.min(frameLevel[m]!, frameLevel[m + 1]!)
  }
  for (let k = 0; k < K; k++) {
    const kk = k + 1
    for (let m = 0; m < n1; m++) {
      const i = k * n1 + m
      const p0 = pow[k * nF + m]!
      const p1 = pow[k * nF + m + 1]!
      ppow[i] = Math.sqrt(p0 * p1)
      pmean[i] = (p0 + p1) / 2
      const fp = fBs[m]!
      const d = wrap(lag1.dphi[i]! - TWO_PI * kk * fp / (r / H))
      pdev[i] = d
      if (p0 > 0 && p1 > 0 && Number.isFinite(fp)) pf0[i] = fp + d * scale / kk
    }
  }

  return {
    partials: { times: ptimes, harmonicity: lag1.harm, level: plevel, f0: pf0, power: ppow, dev: pdev, meanPower: pmean, lagS: H / r },
    times,
    hz,
    varHz,
    harmonicity,
    level: levelI,
    harmonicPower,
    coherent: Uint8Array.from(active),
    rate: r,
    frameS: (2 * M + 1) / r,
    hopS: H / r,
    spanS: L * H / r,
    harmonics: K,
    refHz,
  }
}

// Running median over an odd window; gaps (NaN) are filled from neighbours, else `fallback`.
function smoothMedian (a: Float64Array, width: number, fallback: number): Float64Array {
  const n = a.length
  const out = new Float64Array(n)
  const h = width >> 1
  const buf = new Float64Array(width)
  for (let i = 0; i < n; i++) {
    let k = 0
    const hiJ = Math.min(n - 1, i + h)
    for (let j = Math.max(0, i - h); j <= hiJ; j++) {
      const v = a[j]!
      if (!(v === v)) continue
      // Insertion into the small sorted buffer.
      let p = k++
      while (p > 0 && buf[p - 1]! > v) { buf[p] = buf[p - 1]!; p-- }
      buf[p] = v
    }
    out[i] = k === 0 ? (i > 0 ? out[i - 1]! : fallback) : buf[k >> 1]!
  }
  return out
}

export interface OctaveEvidence {
  /** Mean power at odd and even harmonics of f, half-way between them ((k+½)·f), and at the
   *  quarter positions ((k±¼)·f, noise only for a tone at f, f/2 or 2f). */
  odd: number
  even: number
  half: number
  noise: number
}

/**
 * Octave test for a hold near f: long frames (12 periods of f, Hann) put harmonics, half-way
 * points and quarter points 6, 6 and 3 bins apart, so each is measured without leakage.
 * A tone an octave above f has no odd harmonics of f; an octave below has energy half-way.
 */
export function octaveEvidence (pyr: Pyramid, startS: number, endS: number, f: number): OctaveEvidence {
  let K = Math.max(2, Math.min(8, Math.floor(4000 / f)))
  if ((K + 0.75) * f * 1.02 > pyr.cleanBand(0)) K = Math.max(1, Math.floor(pyr.cleanBand(0) / (f * 1.05) - 0.75))
  const level = pyr.pick(0, (K + 0.75) * f * 1.02)
  const r = pyr.rate(level)
  const x = pyr.level(level)
  const M = Math.max(8, Math.round(6 * r / f))
  const hop = M
  const a = Math.max(M, Math.ceil(startS * r) + M)
  const b = Math.min(x.length - 1 - M, Math.floor(endS * r) - M)
  const win = new Float64Array(2 * M + 1)
  for (let n = -M; n <= M; n++) win[n + M] = 0.5 + 0.5 * Math.cos(Math.PI * n / (M + 1))
  const probe = (c: number, mult: number): number => {
    const th = TWO_PI * mult * f / r
    let sr = 0
    let si = 0
    // Rotation recurrence: one complex multiply per sample.
    const cr = Math.cos(th)
    const ci = Math.sin(th)
    let zr = Math.cos(-th * M)
    let zi = Math.sin(-th * M)
    for (let n = 0; n <= 2 * M; n++) {
      const v = win[n]! * x[c - M + n]!
      sr += v * zr
      si -= v * zi
      const t = zr * cr - zi * ci
      zi = zr * ci + zi * cr
      zr = t
    }
    return sr * sr + si * si
  }
  let odd = 0
  let even = 0
  let half = 0
  let noise = 0
  let frames = 0
  for (let c = a; c <= b; c += hop) {
    frames++
    for (let k = 1; k <= K; k++) {
      if (k % 2) odd += probe(c, k)
      else even += probe(c, k)
      half += probe(c, k - 0.5)
      noise += 0.5 * (probe(c, k - 0.25) + probe(c, k + 0.25))
    }
  }
  if (frames === 0) return { odd: 0, even: 0, half: 0, noise: 0 }
  const nOdd = Math.ceil(K / 2)
  const nEven = Math.floor(K / 2)
  return {
    odd: odd / (frames * nOdd),
    even: nEven > 0 ? even / (frames * nEven) : 0,
    half: half / (frames * K),
    noise: noise / (frames * K),
  }
}

/** In-place radix-2 complex FFT (length a power of two). */
export function fft (re: Float64Array, im: Float64Array): void {
  const n = re.length
  for (let i = 1, j = 0; i < n; i++) {
    let bit = n >> 1
    for (; j & bit; bit >>= 1) j ^= bit
    j ^= bit
    if (i < j) {
      let t = re[i]!; re[i] = re[j]!; re[j] = t
      t = im[i]!; im[i] = im[j]!; im[j] = t
    }
  }
  for (let len = 2; len <= n; len <<= 1) {
    const ang = -TWO_PI / len
    const wr = Math.cos(ang)
    const wi = Math.sin(ang)
    const half = len >> 1
    for (let i = 0; i < n; i += len) {
      let cr = 1
      let ci = 0
      for (let k = 0; k < half; k++) {
        const a = i + k
        const b = a + half
        const tr = re[b]! * cr - im[b]! * ci
        const ti = re[b]! * ci + im[b]! * cr
        re[b] = re[a]! - tr; im[b] = im[a]! - ti
        re[a]! += tr; im[a]! += ti
        const t = cr * wr - ci * wi
        ci = cr * wi + ci * wr
        cr = t
      }
    }
  }
}

/**
 * Power at half a note's frequency against its own fundamental and against the quarter points
 * around it (f/4, 3f/4: noise for any tone at f), over a window: 24 periods of f (Hann) keep the
 * three apart. Another part sounding an octave (or two) below a note puts its fundamental (or
 * 2nd harmonic) there and its harmonics on every harmonic of the note.
 */
export function subOctaveEvidence (pyr: Pyramid, startS: number, endS: number, f: number): { sub: number, fundamental: number, noise: number } {
  const level = pyr.pick(0, 1.1 * f)
  const r = pyr.rate(level)
  const x = pyr.level(level)
  const M = Math.max(8, Math.round(12 * r / f))
  // A window shorter than one frame gets one frame at its centre.
  const mid = Math.round(0.5 * (startS + endS) * r)
  let a = Math.max(M, Math.ceil(startS * r) + M)
  let b = Math.min(x.length - 1 - M, Math.floor(endS * r) - M)
  if (b < a) { a = Math.max(M, Math.min(x.length - 1 - M, mid)); b = a }
  const probe = (c: number, hz: number): number => {
    let sr = 0
    let si = 0
    const th = TWO_PI * hz / r
    for (let n = -M; n <= M; n++) {
      const v = (0.5 + 0.5 * Math.cos(Math.PI * n / (M + 1))) * x[c + n]!
      sr += v * Math.cos(th * n)
      si += v * Math.sin(th * n)
    }
    return sr * sr + si * si
  }
  let sub = 0
  let fundamental = 0
  let noise = 0
  for (let c = a; c <= b; c += M) {
    sub += probe(c, 0.5 * f)
    fundamental += probe(c, f)
    noise += 0.5 * (probe(c, 0.25 * f) + probe(c, 0.75 * f))
  }
  return { sub, fundamental, noise }
}

/** Share of a frame's power (up to the harmonics searched) that a part inside a chord must hold to count as sounding. */
export const CHORD_VOICED_SHARE = 0.08
/** …and how much more power its harmonics must hold than the bins half-way between them (on the
 *  corpus 4 lost half the trombone's frames under a brass quartet; 2.5 still keeps noise out). */
export const CHORD_CONTRAST = 2.5

/**
 * Coarse tracks of one part inside a sounding chord (a quartet recorded together, the take
 * measuring one of its parts), one per expected note of the band. The strongest fundamental there
 * is usually another part's (the bass), so instead of a free pitch search each frame looks for the
 * harmonic series of that note: for every candidate f0 within ±100 ¢ of it, the summed spectral
 * magnitude at its first K harmonics (magnitudes, not powers, so that one loud partial of another
 * part cannot outweigh a whole series). The best candidate is the frame's pitch; the frame counts
 * as voiced when that series holds at least CHORD_VOICED_SHARE of the frame's power below
 * (K + ½)·f0. The energy is the series' own power, so a re-articulation of the part shows as a dip
 * even while the other parts sound on. One spectrum per frame serves every note.
 */
export function chordTracks (pyr: Pyramid, band: { minHz: number, maxHz: number }, notesHz: number[], hopS = 0.03): Map<number, CoarseTrack> {
  const K = Math.max(3, Math.min(8, Math.floor(4000 / band.maxHz)))
  const top = (K + 0.5) * band.maxHz * Math.pow(2, 100 / 1200)
  const level = pyr.pick(0, top)
  const r = pyr.rate(level)
  const x = pyr.level(level)
  // Frames of ≥ 10 periods of the lowest note (and ≥ 90 ms): the part's harmonics stand apart
  // from the other parts' partials. Zero-padded twice for a finer spectrum.
  const Nw = pow2(Math.ceil(r * Math.max(0.09, 10 / band.minHz)))
  const N = 2 * Nw
  const binHz = r / N
  const win = new Float64Array(Nw)
  for (let i = 0; i < Nw; i++) win[i] = 0.5 - 0.5 * Math.cos(TWO_PI * (i + 0.5) / Nw)
  const notes = [...new Set(notesHz)].filter(f => f >= band.minHz && f <= band.maxHz)
  const grid: number[] = []
  for (let c = -100; c <= 100; c += 5) grid.push(Math.pow(2, c / 1200))
  const durationS = pyr.level(0).length / pyr.sampleRate
  const nFrames = Math.max(0, Math.floor(durationS / hopS))
  const times = new Float64Array(nFrames)
  for (let j = 0; j < nFrames; j++) times[j] = (j + 0.5) * hopS
  const hzOf = notes.map(() => new Float64Array(nFrames))
  const energyOf = notes.map(() => new Float64Array(nFrames))
  const shareOf = notes.map(() => new Float64Array(nFrames))
  const re = new Float64Array(N)
  const im = new Float64Array(N)
  const mag = new Float64Array(N / 2 + 1)
  const sal = new Float64Array(grid.length)
  const gaps = new Float64Array(K)
  const magAt = (f: number) => {
    const p = f / binHz
    const i = Math.floor(p)
    if (i + 1 >= mag.length) return 0
    return mag[i]! + (mag[i + 1]! - mag[i]!) * (p - i)
  }
  const cumPow = new Float64Array(mag.length + 1)
  for (let j = 0; j < nFrames; j++) {
    const a = Math.round(times[j]! * r) - (Nw >> 1)
    if (a < 0 || a + Nw > x.length) continue
    re.fill(0)
    im.fill(0)
    for (let i = 0; i < Nw; i++) re[i] = x[a + i]! * win[i]!
    fft(re, im)
    for (let b = 0; b < mag.length; b++) {
      const p = re[b]! * re[b]! + im[b]! * im[b]!
      mag[b] = Math.sqrt(p)
      cumPow[b + 1] = cumPow[b]! + p
    }
    notes.forEach((fNote, ni) => {
      let best = 0
      for (let q = 0; q < grid.length; q++) {
        let s = 0
        const f = fNote * grid[q]!
        for (let k = 1; k <= K; k++) s += magAt(k * f)
        sal[q] = s
        if (s > sal[best]!) best = q
      }
      // Parabola through the best and its neighbours.
      let d = 0
      if (best > 0 && best < grid.length - 1) {
        const y0 = sal[best - 1]!
        const y1 = sal[best]!
        const y2 = sal[best + 1]!
        const den = y0 - 2 * y1 + y2
        d = den < 0 ? Math.max(-0.5, Math.min(0.5, 0.5 * (y0 - y2) / den)) : 0
      }
      const fBest = fNote * grid[best]! * Math.pow(2, 5 * d / 1200)
      // Power of the series (each harmonic's main lobe) against the frame's power below (K + ½)·f0.
      let harm = 0
      let fund = 0
      for (let k = 1; k <= K; k++) {
        const c = Math.round(k * fBest / binHz)
        const lo = Math.max(0, c - 3)
        const hi = Math.min(mag.length - 1, c + 3)
        const p = hi >= lo ? cumPow[hi + 1]! - cumPow[lo]! : 0
        harm += p
        if (k === 1) fund = p
      }
      // The same bins half-way between the harmonics: a series stands out of them; noise, or
      // another piece, fills both alike.
      // Other parts' partials that happen to sit half-way (a part a sixth or a tenth above, a
      // bass a third below: each fills a few gaps, not most) would count against the series:
      // when the note's own fundamental is a spectral peak standing out of the gaps' median, the
      // gaps are judged by their median. Without it (another note sharing only upper partials:
      // the part's fifth below, or a neighbouring note reached within ±100 ¢) the sum stays.
      let gapSum = 0
      for (let k = 1; k <= K; k++) {
        const c = Math.round((k + 0.5) * fBest / binHz)
        const lo = Math.max(0, c - 3)
        const hi = Math.min(mag.length - 1, c + 3)
        gaps[k - 1] = hi >= lo ? cumPow[hi + 1]! - cumPow[lo]! : 0
        gapSum += gaps[k - 1]!
      }
      const gapMed = median(gaps)
      const c1 = Math.round(fBest / binHz)
      const ownPeak = c1 >= 2 && c1 + 2 < mag.length && mag[c1]! >= mag[c1 - 2]! && mag[c1]! >= mag[c1 + 2]!
      const mid = ownPeak && fund >= CHORD_CONTRAST * gapMed ? Math.min(gapSum, K * gapMed) : gapSum
      const bTop = Math.min(mag.length - 1, Math.round((K + 0.5) * fBest / binHz))
      const total = cumPow[bTop + 1]! - cumPow[1]!
      hzOf[ni]![j] = fBest
      energyOf[ni]![j] = harm / (Nw * Nw)
      shareOf[ni]![j] = total > 0 && harm >= CHORD_CONTRAST * mid ? harm / total : 0
    })
  }
  const out = new Map<number, CoarseTrack>()
  notes.forEach((fNote, ni) => {
    const hz = hzOf[ni]!
    const energy = energyOf[ni]!
    const gate = energyGate(energy)
    const voiced = new Uint8Array(nFrames)
    for (let j = 0; j < nFrames; j++) {
      if (energy[j]! > gate && shareOf[ni]![j]! >= CHORD_VOICED_SHARE) voiced[j] = 1
      else hz[j] = 0
    }
    // reachHz 0: the frames never look an octave down (other parts sound there).
    out.set(fNote, { hopS, times, hz, energy, gate, voiced, rate: r, reachHz: 0 })
  })
  return out
}
