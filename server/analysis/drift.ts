// Drift of a take: how the deviation from target moves over time, from a robust straight-line
// fit over the holds measured, with the slope's standard error. The slope is only a figure when
// its uncertainty is smaller than its size; otherwise the holds cannot tell a drift from noise.

export interface DriftPoint {
  /** Time of the hold's steady middle, minutes. */
  tMin: number
  /** Deviation from target, cents. */
  cents: number
  /** Standard error of the hold's centre, cents (null when unknown). */
  errorCents: number | null
}

export interface DriftFit {
  /** Cents per minute, or null when the uncertainty is not smaller than the value. */
  centsPerMin: number | null
  /** Standard error of the slope, cents per minute, or null when it cannot be estimated. */
  uncertaintyCentsPerMin: number | null
}

/** Holds closer together than this (minutes) do not define a slope. */
const MIN_SPAN_MIN = 1 / 60
/** Huber tuning constant in units of the residual scale (common practice: 1.345 gives 95 % efficiency for normal errors). */
const HUBER_K = 1.345

/**
 * Huber regression of cents on time (iteratively reweighted least squares, scale from the
 * median absolute residual) and the slope's standard error from the weighted residual
 * variance with n − 2 degrees of freedom, never below what the holds' own centre errors allow.
 * Fewer than three holds leave the residual scale unknown: no figure.
 */
export function fitDrift (points: DriftPoint[]): DriftFit {
  const pts = points.filter(p => Number.isFinite(p.tMin) && Number.isFinite(p.cents))
  const n = pts.length
  if (n < 3) return { centsPerMin: null, uncertaintyCentsPerMin: null }
  const ts = pts.map(p => p.tMin)
  if (Math.max(...ts) - Math.min(...ts) < MIN_SPAN_MIN) return { centsPerMin: null, uncertaintyCentsPerMin: null }
  const ys = pts.map(p => p.cents)
  const w = new Array<number>(n).fill(1)
  let a = 0
  let b = 0
  let scale = 0
  for (let iter = 0; iter < 20; iter++) {
    let sw = 0; let st = 0; let sy = 0
    for (let i = 0; i < n; i++) { sw += w[i]!; st += w[i]! * ts[i]!; sy += w[i]! * ys[i]! }
    const tm = st / sw
    const ym = sy / sw
    let sxx = 0; let sxy = 0
    for (let i = 0; i < n; i++) { sxx += w[i]! * (ts[i]! - tm) ** 2; sxy += w[i]! * (ts[i]! - tm) * (ys[i]! - ym) }
    if (!(sxx > 0)) return { centsPerMin: null, uncertaintyCentsPerMin: null }
    const nb = sxy / sxx
    const na = ym - nb * tm
    const res = ys.map((y, i) => y - na - nb * ts[i]!)
    const mad = medianOf(res.map(Math.abs))
    scale = Math.max(1.4826 * mad, 1e-6)
    for (let i = 0; i < n; i++) {
      const u = Math.abs(res[i]!) / scale
      w[i] = u <= HUBER_K ? 1 : HUBER_K / u
    }
    const done = Math.abs(nb - b) < 1e-9 && Math.abs(na - a) < 1e-9
    a = na
    b = nb
    if (done) break
  }
  // Standard error of the weighted slope: σ²/Σw(t − t̄)², σ² from the weighted residuals.
  let sw = 0; let st = 0
  for (let i = 0; i < n; i++) { sw += w[i]!; st += w[i]! * ts[i]! }
  const tm = st / sw
  let sxx = 0; let rss = 0
  for (let i = 0; i < n; i++) {
    sxx += w[i]! * (ts[i]! - tm) ** 2
    rss += w[i]! * (ys[i]! - a - b * ts[i]!) ** 2
  }
  let sigma2 = rss / Math.max(1, sw - 2)
  // The holds' own measurement errors set a floor: a line through three exact points is not exact.
  const errs = pts.map(p => p.errorCents).filter((e): e is number => e !== null && Number.isFinite(e))
  if (errs.length) sigma2 = Math.max(sigma2, errs.reduce((s, e) => s + e * e, 0) / errs.length)
  const se = Math.sqrt(sigma2 / sxx)
  if (!Number.isFinite(se) || !Number.isFinite(b)) return { centsPerMin: null, uncertaintyCentsPerMin: null }
  return { centsPerMin: se < Math.abs(b) ? b : null, uncertaintyCentsPerMin: se }
}

function medianOf (v: number[]): number {
  const s = [...v].sort((p, q) => p - q)
  const m = s.length >> 1
  return s.length % 2 ? s[m]! : (s[m - 1]! + s[m]!) / 2
}
