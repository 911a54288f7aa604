// The centre of a hold from its harmonics' power-weighted frequencies.
//
// A part sung or played by several voices at once (a section recorded together) sounds, at each
// harmonic, as a bundle of partials a few cents apart that beat irregularly. The phase of such a
// bundle follows whichever voice is loudest at the moment and jumps where the voices cancel, so
// the time average of its instantaneous frequency is not the centre of the voices. The power-
// weighted average is: the mean of the instantaneous frequency weighted by the instantaneous
// power equals the spectral centroid of the harmonic (the "mean frequency" of a signal in
// time–frequency analysis), and for voices of similar loudness the centroid is the mean of their
// frequencies — the cross terms of the beats add the same share to both sums and cancel. Within
// a few cents, the mean of the frequencies is the mean of the log-frequencies to 0.01 ¢.
//
// They cancel only over many beats. Over a held chord (a second or two) the voices' spectra
// overlap (vibrato spreads each over several hertz), so each harmonic's centroid is off the
// voices' mean by a chance amount of a cent or more that its power does not shrink and that falls
// as the harmonic beats faster (k times the fundamental's rate). A sung "oo" has nearly all its
// power in the fundamental: weighed by power, the centre is the fundamental's alone. So the
// harmonics heard are averaged one vote each.
//
// The spread of the bundle about its moving centre gives the spread between the voices: the
// power-weighted mean square of the phase advance about the local centre, over a lag τ, is
// 2(1 − Σ wᵢ cos 2πΔfᵢτ); for a spread σ of Gaussian shape that is 2(1 − e^(−2π²σ²τ²)).
import type { RefinedTrack } from './pitch'

export interface CentroidCentre {
  /** Power-weighted centre, cents from the reference frequency. */
  centreCents: number
  /** Standard error of the centre, cents: from four block centres and from the harmonics' disagreement (the larger). */
  seCents: number
  /** Harmonics that contributed. */
  harmonics: number
}

/** A harmonic is heard when its power over the stretch is within 40 dB of the strongest's. */
const HEARD_SHARE = 1e-4

const log2c = (x: number) => 1200 * Math.log2(x)

/** Intervals of the refined track whose middles fall in [startS, endS], voiced and above the level floor. */
function intervals (tr: RefinedTrack, startS: number, endS: number): number[] {
  const { times, harmonicity, level } = tr.partials
  const out: number[] = []
  let levelRef = 0
  {
    const lv: number[] = []
    for (let m = 0; m < times.length; m++) if (harmonicity[m]! >= 0.5) lv.push(level[m]!)
    lv.sort((a, b) => a - b)
    levelRef = lv.length ? lv[Math.floor(0.75 * (lv.length - 1))]! : 0
  }
  for (let m = 0; m < times.length; m++) {
    const t = times[m]!
    if (t < startS || t > endS) continue
    if (harmonicity[m]! < 0.5 || !(level[m]! >= 0.05 * levelRef)) continue
    out.push(m)
  }
  return out
}

/**
 * Centre of the stretch [startS, endS] of a refined track: per harmonic, the power-weighted mean
 * of the f0 it gives; then the mean of the harmonics heard, one vote each. Over a window of a
 * second or two the voices' spectra overlap (their vibrato spreads each over several hertz), so
 * the cross terms of their beats leave every harmonic's centroid off the voices' mean by a chance
 * amount that its power does not shrink; the amount falls with the number of beats in the window,
 * which grows with k. Weighed by power, a section sung on "oo" is measured from its fundamental
 * alone (75–94 % of the weight on the sampled corpus) and was 1.4 ¢ (median) from the voices'
 * mean; one vote per harmonic halved that. Null when fewer than 8 intervals carry a usable harmonic.
 */
export function harmonicCentroid (tr: RefinedTrack, refHz: number, startS: number, endS: number): CentroidCentre | null {
  const n = tr.partials.times.length
  const K = tr.harmonics
  const ms = intervals(tr, startS, endS)
  if (ms.length < 8) return null
  const { f0, power } = tr.partials
  // Sums per harmonic and per quarter of the stretch.
  const sw = new Float64Array(K * 4)
  const swc = new Float64Array(K * 4)
  ms.forEach((m, idx) => {
    const block = Math.min(3, Math.floor(4 * idx / ms.length))
    for (let k = 0; k < K; k++) {
      const f = f0[k * n + m]!
      if (!(f > 0)) continue
      const w = power[k * n + m]!
      sw[k * 4 + block]! += w
      swc[k * 4 + block]! += w * log2c(f / refHz)
    }
  })
  // Each harmonic heard (within 40 dB of the strongest) gets one vote; with fewer than three
  // heard, the harmonics weigh by their power and by k².
  const totals = Array.from({ length: K }, (_, k) => { let a = 0; for (let q = 0; q < 4; q++) a += sw[k * 4 + q]!; return a })
  const top = Math.max(...totals)
  const heard = totals.filter(a => a > 0 && a >= HEARD_SHARE * top).length
  const vote = (k: number, w: number) => (heard >= 3 ? (totals[k]! >= HEARD_SHARE * top ? 1 : 0) : w * (k + 1) ** 2)
  const perK: Array<{ c: number, w: number }> = []
  let totalW = 0
  for (let k = 0; k < K; k++) {
    let b = 0
    for (let q = 0; q < 4; q++) b += swc[k * 4 + q]!
    const w = totals[k]! > 0 ? vote(k, totals[k]!) : 0
    if (w > 0) { perK.push({ c: b / totals[k]!, w }); totalW += w }
  }
  if (!perK.length || !(totalW > 0)) return null
  const centre = perK.reduce((s, p) => s + p.w * p.c, 0) / totalW
  // Block centres with the same votes.
  const blocks: number[] = []
  for (let q = 0; q < 4; q++) {
    let a = 0
    let b = 0
    for (let k = 0; k < K; k++) {
      const w = sw[k * 4 + q]!
      if (!(w > 0)) continue
      const v = vote(k, w)
      if (!(v > 0)) continue
      a += v
      b += v * swc[k * 4 + q]! / w
    }
    if (a > 0) blocks.push(b / a)
  }
  const bMean = blocks.reduce((s, v) => s + v, 0) / Math.max(1, blocks.length)
  const seBlocks = blocks.length >= 2
    ? Math.sqrt(blocks.reduce((s, v) => s + (v - bMean) ** 2, 0) / (blocks.length * (blocks.length - 1)))
    : Infinity
  // Harmonics' disagreement: weighted variance over an effective count.
  let seHarm = 0
  if (perK.length >= 2) {
    const w2 = perK.reduce((s, p) => s + p.w * p.w, 0)
    const nEff = (totalW * totalW) / w2
    const v = perK.reduce((s, p) => s + p.w * (p.c - centre) ** 2, 0) / totalW
    seHarm = Math.sqrt(v / Math.max(1, nEff - 1))
  }
  return { centreCents: centre, seCents: Math.max(seBlocks, seHarm), harmonics: perK.length }
}

export interface VoiceSpread {
  /** Spread of the voices' pitches about their moving centre, RMS, cents (power-weighted median over the harmonics). */
  cents: number
  /** The same per harmonic (null where the harmonic is too weak), for diagnosis. */
  perHarmonic: Array<number | null>
}

/**
 * Spread between the voices over [startS, endS]: at each harmonic, the power-weighted coherence
 * of the phase advance about its local centre (±20 ms, which follows a voice's own vibrato)
 * turned into a spread with the Gaussian model above. A single voice gives a few tenths of a
 * cent (noise); a section gives its detuning and the vibrato its voices do not share.
 */
export function voiceSpread (tr: RefinedTrack, startS: number, endS: number): VoiceSpread | null {
  const n = tr.partials.times.length
  const K = tr.harmonics
  const ms = intervals(tr, startS, endS)
  if (ms.length < 8) return null
  const { dev, power, meanPower, lagS } = tr.partials
  const hop = tr.hopS
  const W = Math.max(1, Math.round(0.02 / hop))
  const per: Array<number | null> = []
  const vals: Array<{ c: number, w: number }> = []
  let maxW = 0
  const totals: number[] = []
  for (let k = 0; k < K; k++) {
    let t = 0
    for (const m of ms) t += power[k * n + m]!
    totals.push(t)
    maxW = Math.max(maxW, t)
  }
  for (let k = 0; k < K; k++) {
    if (!(totals[k]! >= 0.05 * maxW)) { per.push(null); continue }
    const cs = new Float64Array(n + 1)
    const sn = new Float64Array(n + 1)
    for (let m = 0; m < n; m++) {
      const p = power[k * n + m]!
      const d = dev[k * n + m]!
      cs[m + 1] = cs[m]! + p * Math.cos(d)
      sn[m + 1] = sn[m]! + p * Math.sin(d)
    }
    let num = 0
    let den = 0
    for (const m of ms) {
      const a = Math.max(0, m - W)
      const b = Math.min(n, m + W + 1)
      const local = Math.atan2(sn[b]! - sn[a]!, cs[b]! - cs[a]!)
      num += power[k * n + m]! * Math.cos(dev[k * n + m]! - local)
      den += meanPower[k * n + m]!
    }
    const C = den > 0 ? num / den : 0
    if (!(C > 0.05)) { per.push(null); continue }
    const sigmaHz = C >= 1 ? 0 : Math.sqrt(-Math.log(C) / (2 * Math.PI * Math.PI * lagS * lagS))
    const c = 1200 / Math.LN2 * sigmaHz / ((k + 1) * tr.refHz)
    per.push(c)
    vals.push({ c, w: totals[k]! })
  }
  if (!vals.length) return null
  vals.sort((p, q) => p.c - q.c)
  const half = vals.reduce((s, v) => s + v.w, 0) / 2
  let acc = 0
  let med = vals[vals.length - 1]!.c
  for (const v of vals) { acc += v.w; if (acc >= half) { med = v.c; break } }
  return { cents: med, perHarmonic: per }
}

export interface ChordCentre extends CentroidCentre {
  /** Per harmonic k = 1…K: whether it was heard (within 40 dB of the strongest, 8 intervals or more). */
  heard: boolean[]
}

/**
 * Centre of a part picked out of a sounding chord over [startS, endS]: each harmonic's mean f0
 * (cents from refHz), then their median (one vote per harmonic heard, within 40 dB of the
 * strongest: power weights would hand the centre to the one harmonic another part's loud partial
 * sits on). Such a harmonic is pulled towards the other part's pitch; the median follows the
 * harmonics clear of the other parts, and their disagreement (1.4826 × MAD / √n) is the standard
 * error. Null when fewer than three harmonics are heard.
 */
export function harmonicMedian (tr: RefinedTrack, refHz: number, startS: number, endS: number): ChordCentre | null {
  const n = tr.partials.times.length
  const ms = intervals(tr, startS, endS)
  const { f0, power } = tr.partials
  const perK: Array<{ k: number, c: number, w: number }> = []
  for (let k = 0; k < tr.harmonics; k++) {
    let s = 0
    let p = 0
    let cnt = 0
    for (const m of ms) {
      const f = f0[k * n + m]!
      if (!(f > 0)) continue
      s += log2c(f / refHz)
      p += power[k * n + m]!
      cnt++
    }
    if (cnt >= 8 && p > 0) perK.push({ k, c: s / cnt, w: p / cnt })
  }
  const top = Math.max(0, ...perK.map(p => p.w))
  const votes = perK.filter(p => p.w >= 1e-4 * top)
  if (votes.length < 3) return null
  const med = (v: number[]) => {
    const a = [...v].sort((p, q) => p - q)
    const m = a.length >> 1
    return a.length % 2 ? a[m]! : (a[m - 1]! + a[m]!) / 2
  }
  const centre = med(votes.map(p => p.c))
  const mad = med(votes.map(p => Math.abs(p.c - centre)))
  const heard = Array.from({ length: tr.harmonics }, (_, k) => votes.some(p => p.k === k))
  return { centreCents: centre, seCents: Math.max(0.05, 1.4826 * mad / Math.sqrt(votes.length)), harmonics: votes.length, heard }
}
