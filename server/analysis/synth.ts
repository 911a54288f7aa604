// Deterministic synthetic takes with known truth, for tests, the benchmark and the demo seed.
// A hold is a harmonic tone whose log-frequency carries a settling transient, vibrato, slow
// wobble, fast jitter and drift; the spectrum is shaped like a sung vowel (formants) or like
// brass (harmonics rising to a peak); breath-like noise is added at a chosen SNR.

export type SynthTimbre = 'voice-soprano' | 'voice-alto' | 'voice-tenor' | 'voice-bass' | 'brass' | 'sine'

export interface SynthHold {
  startS: number
  endS: number
  /** Pitch at the onset (before drift), in Hz. */
  hz: number
  /** Linear drift of the pitch within the hold, cents per second (negative = sagging). */
  driftCentsPerS?: number
  /** Peak level of this hold (0–1); default 0.3. */
  level?: number
}

export interface SynthSpec {
  sampleRate: number
  durationS: number
  holds: SynthHold[]
  timbre: SynthTimbre
  /** Vibrato: sinusoidal in log-frequency, extent = peak deviation in cents. */
  vibrato?: { rateHz: number, extentCents: number }
  /** RMS of the slow random wobble (plus a little fast jitter), cents. */
  jitterCents?: number
  /** Signal-to-noise ratio of breath-like noise against the held tones, dB; no noise when absent. */
  snrDb?: number
  /** Seed of the pseudo-random generator (phases, wobble, transients, noise). */
  seed?: number
  /** Peak of the settling transient in cents (sign drawn from the seed); default 6. */
  settleCents?: number
  /** Attack and release times of the amplitude envelope, seconds; defaults 0.06 and 0.1. */
  attackS?: number
  releaseS?: number
  /** Louder noise puffs (inhaled breaths) in gaps between holds. */
  breaths?: boolean
}

export interface SynthHoldTruth {
  startS: number
  endS: number
  /** Window over which the truth is defined: onset + 0.3 s to release start − 0.05 s, shortened
   *  equally at both ends to a whole number of vibrato cycles when there is vibrato. */
  steadyStartS: number
  steadyEndS: number
  /** Truth of the hold centre: exp of the mean synthesised log-frequency over the steady window. */
  centreHz: number
  /** Mean of the synthesised pitch over the steady window in cents above `hz`. */
  centreCents: number
}

export interface SynthResult {
  samples: Float32Array
  holds: SynthHoldTruth[]
}

/** Time after the onset from which a synthetic hold counts as steady (transient decayed). */
export const SYNTH_STEADY_AFTER_ONSET_S = 0.3

/** Small fast deterministic PRNG (mulberry32); returns a function giving floats in [0, 1). */
export function mulberry32 (seed: number): () => number {
  let a = (seed >>> 0) || 0x9e3779b9
  return () => {
    a = (a + 0x6d2b79f5) >>> 0
    let t = a
    t = Math.imul(t ^ (t >>> 15), t | 1)
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61)
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296
  }
}

function gaussian (rand: () => number): () => number {
  let spare: number | null = null
  return () => {
    if (spare !== null) { const s = spare; spare = null; return s }
    let u = 0
    while (u <= 1e-12) u = rand()
    const v = rand()
    const r = Math.sqrt(-2 * Math.log(u))
    spare = r * Math.sin(2 * Math.PI * v)
    return r * Math.cos(2 * Math.PI * v)
  }
}

// Approximate formant frequencies and bandwidths (Hz) of a sung open /a/ per voice type, from
// memory of the commonly printed vowel-formant tables.
const FORMANTS: Record<string, Array<[number, number]>> = {
  'voice-soprano': [[800, 80], [1150, 90], [2900, 120], [3900, 130], [4950, 140]],
  'voice-alto': [[800, 80], [1150, 90], [2800, 120], [3500, 130], [4950, 140]],
  'voice-tenor': [[650, 80], [1080, 90], [2650, 120], [2900, 130], [3250, 140]],
  'voice-bass': [[600, 60], [1040, 70], [2250, 110], [2450, 120], [2750, 130]],
}

/** Relative amplitude of harmonic k of a tone at f0 for a timbre (unnormalised). */
export function harmonicAmplitude (timbre: SynthTimbre, f0: number, k: number): number {
  const f = k * f0
  if (timbre === 'sine') return k === 1 ? 1 : 0
  if (timbre === 'brass') {
    // Brass: amplitudes rise towards a spectral peak that moves up with the note, then fall.
    const fp = Math.min(1400, Math.max(250, 5 * f0))
    return f <= fp ? Math.pow(f / fp, 1.2) : Math.pow(fp / f, 2.2)
  }
  // Voice: glottal source plus lip radiation falls about 6 dB per octave; formant resonators on top.
  let g = 1 / k
  for (const [F, B] of FORMANTS[timbre]!) {
    g *= (F * F) / Math.sqrt((F * F - f * f) ** 2 + (B * f) ** 2)
  }
  return g
}

/** Synthesises a take (mono, −1…1) from a spec; same spec and seed give the same samples. */
export function synthTake (spec: SynthSpec): Float32Array {
  return synthTakeWithTruth(spec).samples
}

/** Like synthTake, and also returns each hold's truth (mean log-frequency over its steady window). */
export function synthTakeWithTruth (spec: SynthSpec): SynthResult {
  const sr = spec.sampleRate
  if (!(sr > 0) || !Number.isFinite(sr)) throw new RangeError('synthTake needs a positive sample rate')
  if (!(spec.durationS >= 0) || !Number.isFinite(spec.durationS)) throw new RangeError('synthTake needs a duration')
  const n = Math.round(spec.durationS * sr)
  const out = new Float64Array(n)
  const rand = mulberry32(spec.seed ?? 1)
  const gauss = gaussian(rand)
  const attackS = spec.attackS ?? 0.06
  const releaseS = spec.releaseS ?? 0.1
  const settle = spec.settleCents ?? 6
  const jitter = spec.jitterCents ?? 0
  const vib = spec.vibrato
  const nyquistLimit = Math.min(0.45 * sr, 9000)
  const truths: SynthHoldTruth[] = []
  let sigEnergy = 0
  let sigCount = 0
  // Draws are made in a fixed order per hold so every hold's randomness depends only on the seed.

  // Pitch contour at a control rate, linearly interpolated per sample: fast and smooth enough.
  const CTRL = 16
  for (const hold of spec.holds) {
    if (!(hold.hz > 0) || !(hold.endS > hold.startS)) throw new RangeError('synthTake: a hold needs hz > 0 and endS > startS')
    const i0 = Math.max(0, Math.round(hold.startS * sr))
    const i1 = Math.min(n, Math.round(hold.endS * sr))
    const len = i1 - i0
    const level = hold.level ?? 0.3
    const drift = hold.driftCentsPerS ?? 0
    const settleAmp = settle * (rand() < 0.5 ? -1 : 1) * (0.6 + 0.8 * rand())
    const settleTau = 0.04 + 0.03 * rand()
    const vibPhase = 2 * Math.PI * rand()
    // Slow wobble: three incommensurate sinusoids (0.4–3 Hz), scaled so their RMS is 0.9·jitter.
    const wob = [0, 1, 2].map(() => ({ f: 0.4 + 2.6 * rand(), p: 2 * Math.PI * rand() }))
    const wobAmp = jitter * 0.9 * Math.sqrt(2 / 3)
    // Fast jitter: first-order low-passed Gaussian noise (corner ≈ 15 Hz) at 0.3·jitter RMS.
    const jAlpha = Math.exp(-2 * Math.PI * 15 * CTRL / sr)
    const jGain = jitter * 0.3 * Math.sqrt(1 - jAlpha * jAlpha)
    let jState = jitter > 0 ? gauss() * jitter * 0.3 : 0

    const kMax = Math.max(1, Math.min(80, Math.floor(nyquistLimit / (hold.hz * 1.06))))
    const ac = new Float64Array(kMax)
    const as = new Float64Array(kMax)
    let norm = 0
    for (let k = 1; k <= kMax; k++) {
      const a = harmonicAmplitude(spec.timbre, hold.hz, k)
      norm += a * a
      const th = 2 * Math.PI * rand()
      ac[k - 1] = a * Math.cos(th)
      as[k - 1] = a * Math.sin(th)
    }
    const scale = level / Math.sqrt(2 * norm) // RMS of the steady tone ≈ level/2 … keeps peaks in range
    for (let k = 0; k < kMax; k++) { ac[k]! *= scale; as[k]! *= scale }
    let kUse = kMax
    while (kUse > 1 && Math.abs(ac[kUse - 1]!) + Math.abs(as[kUse - 1]!) < 1e-6 * scale) kUse--

    const contour = (t: number): number => {
      const tt = t // seconds since onset
      let c = drift * tt + settleAmp * Math.exp(-tt / settleTau)
      if (vib) c += vib.extentCents * Math.sin(2 * Math.PI * vib.rateHz * tt + vibPhase)
      if (jitter > 0) {
        for (const w of wob) c += wobAmp * Math.sin(2 * Math.PI * w.f * tt + w.p)
        jState = jAlpha * jState + jGain * gauss()
        c += jState
      }
      return c
    }

    let steadyStart = hold.startS + SYNTH_STEADY_AFTER_ONSET_S
    let steadyEnd = hold.endS - releaseS - 0.05
    if (vib && vib.rateHz > 0 && vib.extentCents > 0) {
      // With vibrato the window is shortened (equally at both ends) to whole vibrato cycles, so
      // the truth is not moved by a part-cycle.
      const cycles = Math.floor((steadyEnd - steadyStart) * vib.rateHz)
      if (cycles >= 1) {
        const cut = (steadyEnd - steadyStart) - cycles / vib.rateHz
        steadyStart += cut / 2
        steadyEnd -= cut / 2
      }
    }
    // Contour at control points; the truth is the mean of the per-sample (linearly
    // interpolated) contour over the steady window.
    const nCtrl = Math.ceil(len / CTRL) + 1
    const cents = new Float64Array(nCtrl)
    for (let m = 0; m < nCtrl; m++) cents[m] = contour(m * CTRL / sr)
    const s0 = Math.max(0, Math.ceil(steadyStart * sr) - i0)
    const s1 = Math.min(len - 1, Math.floor(steadyEnd * sr) - i0)
    let truthSum = 0
    let truthN = 0
    for (let j = s0; j <= s1; j++) {
      const m = Math.floor(j / CTRL)
      const q = (j - m * CTRL) / CTRL
      truthSum += cents[m]! + (cents[m + 1]! - cents[m]!) * q
      truthN++
    }
    const steps = new Float64Array(nCtrl)
    const w0 = 2 * Math.PI * hold.hz / sr
    for (let m = 0; m < nCtrl; m++) steps[m] = w0 * Math.exp(cents[m]! * Math.LN2 / 1200)
    const e = renderHold(out, i0, len, CTRL, steps, ac, as, kUse, Math.round(attackS * sr), Math.round(releaseS * sr), 2 * Math.PI * rand(), s0, s1)
    sigEnergy += e
    sigCount += Math.max(0, s1 - s0 + 1)
    const centreCents = truthN > 0 ? truthSum / truthN : 0
    truths.push({
      startS: hold.startS,
      endS: hold.endS,
      steadyStartS: steadyStart,
      steadyEndS: steadyEnd,
      centreCents,
      centreHz: hold.hz * Math.pow(2, centreCents / 1200),
    })
  }

  if (spec.snrDb !== undefined && Number.isFinite(spec.snrDb) && n > 0) {
    const sigRms = sigCount > 0 ? Math.sqrt(sigEnergy / sigCount) : 0.1
    const noiseRms = sigRms / Math.pow(10, spec.snrDb / 20)
    addBreathNoise(out, sr, noiseRms, rand, spec.breaths ? spec.holds : null)
  }

  const samples = new Float32Array(n)
  for (let i = 0; i < n; i++) {
    const v = out[i]!
    samples[i] = v > 1 ? 1 : v < -1 ? -1 : v
  }
  return { samples, holds: truths }
}

// Adds one hold's samples to `out`; returns the energy over the steady samples [s0, s1].
// Exact phase at each control point; between them the rotation uses a Taylor series of the
// per-sample step, so no error accumulates and no sine is called per sample.
function renderHold (out: Float64Array, i0: number, len: number, ctrl: number, steps: Float64Array,
  ac: Float64Array, as: Float64Array, kUse: number, attackN: number, releaseN: number, phase0: number,
  s0: number, s1: number): number {
  let phase = phase0
  let energy = 0
  const TWO_PI = 2 * Math.PI
  for (let j0 = 0, m = 0; j0 < len; j0 += ctrl, m++) {
    const dA = steps[m]!
    const dStep = (steps[m + 1]! - dA) / ctrl
    let c1 = Math.cos(phase)
    let sn = Math.sin(phase)
    const jEnd = Math.min(len, j0 + ctrl)
    for (let j = j0; j < jEnd; j++) {
      let ck = c1
      let sk = sn
      let y = 0
      for (let k = 0; k < kUse; k++) {
        y += as[k]! * ck + ac[k]! * sk
        const cn = ck * c1 - sk * sn
        sk = sk * c1 + ck * sn
        ck = cn
      }
      if (j < attackN) y *= 0.5 - 0.5 * Math.cos(Math.PI * j / attackN)
      if (len - j < releaseN) y *= 0.5 - 0.5 * Math.cos(Math.PI * (len - j) / releaseN)
      out[i0 + j]! += y
      if (j >= s0 && j <= s1) energy += y * y
      const d = dA + dStep * (j - j0)
      phase += d
      const d2 = d * d
      const cd = 1 - d2 * (0.5 - d2 * (1 / 24 - d2 / 720))
      const sd = d * (1 - d2 * (1 / 6 - d2 * (1 / 120 - d2 / 5040)))
      const cn = c1 * cd - sn * sd
      sn = sn * cd + c1 * sd
      c1 = cn
    }
    if (phase > TWO_PI) phase -= TWO_PI * Math.floor(phase / TWO_PI)
  }
  return energy
}

// Breath-like noise: white noise (sum of uniforms, near-Gaussian) band-limited by one-pole high-pass (~250 Hz) and low-pass
// (~5 kHz) filters, slowly amplitude-modulated, scaled to the wanted RMS.
function addBreathNoise (out: Float64Array, sr: number, rms: number, rand: () => number, holds: SynthHold[] | null) {
  const n = out.length
  const noise = new Float64Array(n)
  const aLp = Math.exp(-2 * Math.PI * Math.min(5000, 0.4 * sr) / sr)
  const aHp = Math.exp(-2 * Math.PI * 250 / sr)
  let lp = 0
  let hpPrevIn = 0
  let hp = 0
  let e = 0
  for (let i = 0; i < n; i++) {
    lp = aLp * lp + (1 - aLp) * (rand() + rand() + rand() - 1.5) * 2
    hp = aHp * (hp + lp - hpPrevIn)
    hpPrevIn = lp
    const am = 1 + 0.15 * Math.sin(2 * Math.PI * 0.7 * i / sr)
    noise[i] = hp * am
    e += noise[i]! * noise[i]!
  }
  const g = e > 0 ? rms / Math.sqrt(e / n) : 0
  for (let i = 0; i < n; i++) out[i]! += g * noise[i]!
  if (!holds || holds.length < 2) return
  // Inhaled breaths: a 0.25-s noise puff about 10 dB above the floor in each gap of 0.3 s or more.
  const sorted = [...holds].sort((a, b) => a.startS - b.startS)
  for (let h = 1; h < sorted.length; h++) {
    const gapStart = sorted[h - 1]!.endS
    const gapEnd = sorted[h]!.startS
    if (gapEnd - gapStart < 0.3) continue
    const mid = (gapStart + gapEnd) / 2
    const i0 = Math.max(0, Math.round((mid - 0.125) * sr))
    const i1 = Math.min(n, Math.round((mid + 0.125) * sr))
    for (let i = i0; i < i1; i++) {
      const w = Math.sin(Math.PI * (i - i0) / (i1 - i0))
      out[i]! += 2.2 * g * noise[i]! * w
    }
  }
}
