// Signal helpers of the analysis engine: a decimation pyramid built from one linear-phase
// half-band low-pass, so each level is a clean, time-aligned copy of the take at half the rate
// of the one above. Pitch work then runs at the lowest rate that still holds the harmonics it
// needs, which is what makes the engine fast without losing precision.

/** Zeroth-order modified Bessel function of the first kind (series; for the Kaiser window). */
export function besselI0 (x: number): number {
  let sum = 1
  let term = 1
  const q = (x * x) / 4
  for (let k = 1; k < 60; k++) {
    term *= q / (k * k)
    sum += term
    if (term < sum * 1e-17) break
  }
  return sum
}

/**
 * Half-band low-pass (Kaiser-windowed sinc, cut-off at a quarter of the input rate) as
 * symmetric odd-index coefficients: h(0) and c[p] = h(±(2p+1)); even taps other than 0 are zero.
 * With 47 taps and β = 7.86 (≈ 80 dB) the pass band reaches 0.19·fs and the stop band starts at
 * 0.31·fs, so after halving the rate everything below 0.38 of the new rate is alias-free.
 */
export function designHalfband (halfLength = 23, beta = 7.86): { h0: number, c: Float64Array } {
  if (halfLength % 2 === 0) throw new RangeError('half-band half length must be odd')
  const taps = (halfLength + 1) / 2
  const c = new Float64Array(taps)
  const i0b = besselI0(beta)
  let sum = 0
  for (let p = 0; p < taps; p++) {
    const n = 2 * p + 1
    const sinc = Math.sin(Math.PI * n / 2) / (Math.PI * n / 2)
    const r = n / (halfLength + 1)
    const w = besselI0(beta * Math.sqrt(Math.max(0, 1 - r * r))) / i0b
    c[p] = 0.5 * sinc * w
    sum += 2 * c[p]!
  }
  // Scale the odd taps to sum to ½ with h(0) = ½: unit DC gain and an exact half-band
  // (H(f) + H(½ − f) = 1).
  for (let p = 0; p < taps; p++) c[p]! *= 0.5 / sum
  return { h0: 0.5, c }
}

const HALFBAND = designHalfband()

/** Share of a pyramid level's rate below which content is alias-free (level 0 uses 0.45). */
export const PYRAMID_CLEAN_BAND = 0.38

/**
 * Low-pass and halve the rate with zero phase: output m sits exactly at input sample 2m, so
 * times stay aligned across levels. Samples beyond the ends count as zero.
 */
export function decimate2 (x: Float32Array): Float32Array {
  const n = x.length
  const m = Math.ceil(n / 2)
  const y = new Float32Array(m)
  const { h0, c } = HALFBAND
  const taps = c.length
  const reach = 2 * taps - 1
  // Interior, unrolled for the 12 coefficient pairs (about twice as fast as the loop).
  const jLo = Math.ceil(reach / 2)
  const jHi = Math.floor((n - 1 - reach) / 2)
  if (taps === 12 && jHi >= jLo) {
    const c0 = c[0]!; const c1 = c[1]!; const c2 = c[2]!; const c3 = c[3]!; const c4 = c[4]!; const c5 = c[5]!
    const c6 = c[6]!; const c7 = c[7]!; const c8 = c[8]!; const c9 = c[9]!; const c10 = c[10]!; const c11 = c[11]!
    for (let j = jLo; j <= jHi; j++) {
      const i = 2 * j
      y[j] = h0 * x[i]! + c0 * (x[i - 1]! + x[i + 1]!) + c1 * (x[i - 3]! + x[i + 3]!) + c2 * (x[i - 5]! + x[i + 5]!) +
        c3 * (x[i - 7]! + x[i + 7]!) + c4 * (x[i - 9]! + x[i + 9]!) + c5 * (x[i - 11]! + x[i + 11]!) +
        c6 * (x[i - 13]! + x[i + 13]!) + c7 * (x[i - 15]! + x[i + 15]!) + c8 * (x[i - 17]! + x[i + 17]!) +
        c9 * (x[i - 19]! + x[i + 19]!) + c10 * (x[i - 21]! + x[i + 21]!) + c11 * (x[i - 23]! + x[i + 23]!)
    }
  }
  const generic = (j: number) => {
    const centre = 2 * j
    let acc = h0 * x[centre]!
    for (let p = 0; p < taps; p++) {
      const d = 2 * p + 1
      const a = centre - d >= 0 ? x[centre - d]! : 0
      const b = centre + d < n ? x[centre + d]! : 0
      acc += c[p]! * (a + b)
    }
    y[j] = acc
  }
  if (taps === 12 && jHi >= jLo) {
    for (let j = 0; j < jLo; j++) generic(j)
    for (let j = jHi + 1; j < m; j++) generic(j)
  } else {
    for (let j = 0; j < m; j++) generic(j)
  }
  return y
}

/** The take at rates fs, fs/2, fs/4 … built on demand; level j sample m is at time m·2^j/fs. */
export class Pyramid {
  readonly sampleRate: number
  private readonly levels: Float32Array[]

  constructor (samples: Float32Array, sampleRate: number) {
    this.sampleRate = sampleRate
    this.levels = [samples]
  }

  /** Samples of level j (0 = the take itself). */
  level (j: number): Float32Array {
    while (this.levels.length <= j) this.levels.push(decimate2(this.levels[this.levels.length - 1]!))
    return this.levels[j]!
  }

  rate (j: number): number {
    return this.sampleRate / Math.pow(2, j)
  }

  /** Highest usable frequency at level j (alias-free band). */
  cleanBand (j: number): number {
    return j === 0 ? 0.45 * this.sampleRate : PYRAMID_CLEAN_BAND * this.rate(j)
  }

  /** Deepest level whose rate is at least `minRate` and whose clean band reaches `minBand` Hz. */
  pick (minRate: number, minBand = 0): number {
    let j = 0
    while (j < 16 && this.rate(j + 1) >= minRate && this.cleanBand(j + 1) >= minBand && this.rate(j + 1) >= 64) j++
    return j
  }
}

// Finite values copied into a sorted Float64Array (typed-array sort is numeric and fast).
function sortedFinite (values: ArrayLike<number>): Float64Array {
  const n = values.length
  const a = new Float64Array(n)
  let k = 0
  for (let i = 0; i < n; i++) {
    const v = values[i]!
    if (v === v && v !== Infinity && v !== -Infinity) a[k++] = v
  }
  return a.subarray(0, k).sort()
}

/** Median of the finite values of an array (NaN when there are none). */
export function median (values: ArrayLike<number>): number {
  const a = sortedFinite(values)
  if (a.length === 0) return NaN
  const h = a.length >> 1
  return a.length % 2 ? a[h]! : (a[h - 1]! + a[h]!) / 2
}

/** q-quantile (0–1) of the finite values (linear interpolation; NaN when empty). */
export function quantile (values: ArrayLike<number>, q: number): number {
  const a = sortedFinite(values)
  if (a.length === 0) return NaN
  const pos = Math.min(a.length - 1, Math.max(0, q * (a.length - 1)))
  const lo = Math.floor(pos)
  const hi = Math.ceil(pos)
  return a[lo]! + (a[hi]! - a[lo]!) * (pos - lo)
}
