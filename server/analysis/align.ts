// Alignment of a part's expected holds to a take's coarse pitch track.
// Step 1 finds a global affine map t_take = offset + scale·t_drill (lead-in silence, late or
// early start, a tempo up to 40 % slower or 60 % faster) by maximising how many frames inside
// each mapped hold carry the expected pitch. Step 2 places every hold with a segmental dynamic
// programme near that map: each hold gets a contiguous run of frames or is declared missing;
// frames between holds (breaths, extra chords, noise) cost nothing; a duration prior splits
// repeated notes that no pitch change separates; a weak position prior keeps repetitive drills
// from sliding. Nothing here is ever guessed: a hold with no agreeing frames stays missing.
import type { CoarseTrack } from './pitch'
import type { ExpectedHold } from './types'

export interface HoldPlacement {
  /** Index into the expected (non-rest) holds given to alignHolds. */
  hold: number
  found: boolean
  /** Frames [frameStart, frameEnd) when found. */
  frameStart: number
  frameEnd: number
  /** Take time of the placed run, or of the mapped expectation when missing. */
  startS: number
  endS: number
}

export interface Alignment {
  offsetS: number
  timeScale: number
  placements: HoldPlacement[]
}

export interface AlignOptions {
  /** Range of the global tempo ratio take/drill searched (default 0.6–1.6). */
  minScale?: number
  maxScale?: number
  /** A global map already known (from the holds' onsets): step 1 is skipped. */
  map?: { offsetS: number, timeScale: number }
  /** With a map known from the whole chord's onsets: each hold stays inside its own chord under
   *  the map, give or take this many seconds (it may start late or end early, never run onto a
   *  neighbouring chord). */
  withinChordS?: number
  /** Cost of a frame with no pitch inside a hold (default COST_UNVOICED). A part picked out of a
   *  sounding chord shows its series only where it stands out of the other parts: a frame
   *  without it there is no silence. */
  unvoicedCost?: number
}

// Frame costs relative to "between holds" (which costs 0); negative = evidence for the hold.
const COST_MATCH = -1 // within 0.6 semitone of the expected note
const COST_OCTAVE = -0.8 // within 0.6 semitone after an octave fold (detector or player octave error)
const COST_NEAR = -0.3 // within 3.5 semitones: badly out of tune, still this hold
const COST_FAR = 0.3 // a clearly different note
const COST_UNVOICED = 0.8 // silence or breath inside a hold (a breath between repeated notes splits them)
// Gains for the global map (what a mapped hold earns per frame).
const GAIN_MATCH = 1
const GAIN_OCTAVE = 0.8
const GAIN_NEAR = 0.3
const GAIN_FAR = -0.3
// Duration prior: holds shorter than their chord are common (breaths, late entries), longer
// ones are not, so shortness is charged less.
const DURATION_WEIGHT_SHORT = 0.1
const DURATION_WEIGHT_LONG = 0.3
const POSITION_WEIGHT_PER_S = 5
// A hold does not run across a boundary the take itself shows: a lasting pitch change or a
// re-articulation (a short energy dip between two loud stretches). Each boundary strictly
// inside a placed hold costs as much as the hold's expected length in matching frames.
const BOUNDARY_MARGIN_S = 0.12
// A dip the note sounds through (no pitch change, no break) splits a repeated note only this
// near its chord boundary under the map: several voices on one part dip as they beat, anywhere
// in a hold, by up to about 20 dB at the fundamental.
const REPEAT_DIP_WINDOW_S = 0.35

/** boundaryFrames' marks: a lasting pitch change or a break in the sound (the level falls below
 *  the voicing gate at the dip), or only a dip in level with the note sounding right through it. */
export const BOUNDARY_PITCH = 1
export const BOUNDARY_DIP = 2

/**
 * Frames where the take shows a new note starting: the median pitch of the next five voiced
 * frames differs from that of the previous five by more than 0.7 semitone (a lasting change,
 * not one stray frame), or the energy dips below a quarter of the level on both sides within
 * 0.6 s (a re-articulation or a breath) with no other such dip within 0.5 s (beating voices).
 * Local strongest points only, marked BOUNDARY_DIP where the only reason is a dip the note
 * sounds through (the level stays above the voicing gate), BOUNDARY_PITCH otherwise.
 */
export function boundaryFrames (track: CoarseTrack): Uint8Array {
  const F = track.times.length
  const out = new Uint8Array(F)
  const K = 5
  const maxGap = Math.round(0.3 / track.hopS)
  const semis = new Float64Array(F)
  for (let j = 0; j < F; j++) semis[j] = track.voiced[j] ? 12 * Math.log2(track.hz[j]!) : NaN
  const strength = new Float64Array(F)
  // Where the strongest reason is a dip the note sounds through: BOUNDARY_DIP, else BOUNDARY_PITCH.
  const dipOnly = new Uint8Array(F)
  const prev: number[] = []
  for (let j = 0; j < F; j++) {
    if (!track.voiced[j]) continue
    const next: number[] = []
    for (let q = j; q < F && next.length < K && q - j <= maxGap; q++) if (track.voiced[q]) next.push(semis[q]!)
    const before = prev.filter(v => Number.isFinite(v))
    if (before.length === K && next.length === K) {
      const d = Math.abs(med(next) - med(before))
      if (d > 0.7) strength[j] = d
    }
    prev.push(semis[j]!)
    if (prev.length > K) prev.shift()
    // Frames too far back do not count as "before".
    if (j + 1 < F && !track.voiced[j + 1]) {
      let q = j + 1
      while (q < F && !track.voiced[q]) q++
      if (q - j > maxGap) prev.length = 0
    }
  }
  // Energy dips (in dB terms: below a quarter of the louder context on both sides). Several
  // voices on one part beat: their level dips every few tenths of a second without any new note,
  // so a dip with another dip within 0.5 s either side is beating, not a re-articulation (a real
  // one is a chord apart from the next).
  const w = Math.max(2, Math.round(0.6 / track.hopS))
  const dips: number[] = []
  for (let j = 1; j < F - 1; j++) {
    const e = track.energy[j]!
    if (!(e < track.energy[j - 1]!) || !(e <= track.energy[j + 1]!)) continue
    let l = 0
    let r = 0
    for (let q = Math.max(0, j - w); q < j; q++) l = Math.max(l, track.energy[q]!)
    for (let q = j + 1; q <= Math.min(F - 1, j + w); q++) r = Math.max(r, track.energy[q]!)
    if (l > track.gate && r > track.gate && e < 0.25 * l && e < 0.25 * r) dips.push(j)
  }
  // Two minima of one gap (a breath, a stop) are one dip: dips count as separate only with a
  // loud stretch (4× the deeper side) between them.
  const beatGap = Math.round(0.5 / track.hopS)
  const separate = (a: number, b: number) => {
    let top = 0
    for (let q = a + 1; q < b; q++) top = Math.max(top, track.energy[q]!)
    return top >= 4 * Math.max(track.energy[a]!, track.energy[b]!)
  }
  const clusters: number[][] = []
  for (const j of dips) {
    const last = clusters[clusters.length - 1]
    if (last && !separate(last[last.length - 1]!, j)) last.push(j)
    else clusters.push([j])
  }
  clusters.forEach((c, i) => {
    const p = clusters[i - 1]
    const q = clusters[i + 1]
    const beating = (p !== undefined && c[0]! - p[p.length - 1]! <= beatGap) || (q !== undefined && q[0]! - c[c.length - 1]! <= beatGap)
    if (beating) return
    let voicedThrough = true
    for (let j = Math.max(0, c[0]! - 1); j <= Math.min(F - 1, c[c.length - 1]! + 1); j++) if (!(track.energy[j]! > track.gate)) voicedThrough = false
    for (const j of c) if (!(strength[j]! >= 1)) { strength[j] = 1; dipOnly[j] = voicedThrough ? 1 : 0 }
  })
  const half = Math.max(1, Math.round(0.15 / track.hopS))
  for (let j = 0; j < F; j++) {
    if (!(strength[j]! > 0)) continue
    let isMax = true
    for (let q = Math.max(0, j - half); q <= Math.min(F - 1, j + half) && isMax; q++) {
      if (strength[q]! > strength[j]! || (strength[q]! === strength[j]! && q < j)) isMax = false
    }
    if (isMax) out[j] = dipOnly[j] ? BOUNDARY_DIP : BOUNDARY_PITCH
  }
  return out
}

function med (v: number[]): number {
  const s = [...v].sort((p, q) => p - q)
  const m = s.length >> 1
  return s.length % 2 ? s[m]! : (s[m - 1]! + s[m]!) / 2
}

function frameClass (hz: number, voiced: number, expectedHz: number): 0 | 1 | 2 | 3 | 4 {
  if (!voiced || !(hz > 0)) return 4
  const d = 12 * Math.log2(hz / expectedHz)
  if (Math.abs(d) <= 0.6) return 0
  const oct = Math.round(d / 12)
  if (Math.abs(oct) === 1 && Math.abs(d - 12 * oct) <= 0.6) return 1
  if (Math.abs(d) <= 3.5) return 2
  return 3
}

/**
 * Places each expected (non-rest) hold in the take, or marks it missing. `tracks[i]` is the
 * coarse track that covers hold i's note (tracks share their frame times).
 */
export function alignHolds (tracks: CoarseTrack[], holds: ExpectedHold[], opts: AlignOptions = {}): Alignment {
  const N = holds.length
  if (N === 0) return { offsetS: 0, timeScale: 1, placements: [] }
  if (tracks.length !== N) throw new RangeError('alignHolds needs one coarse track per hold')
  const F = Math.min(...tracks.map(t => t.times.length))
  const hop = tracks[0]!.hopS
  const takeDur = F * hop

  // Prefix sums per distinct expected frequency: DP costs and global-map gains.
  const keyOf = (hz: number) => hz.toFixed(6)
  const costPrefix = new Map<string, Float64Array>()
  const gainPrefix = new Map<string, Float64Array>()
  const costTable = [COST_MATCH, COST_OCTAVE, COST_NEAR, COST_FAR, opts.unvoicedCost ?? COST_UNVOICED]
  const gainTable = [GAIN_MATCH, GAIN_OCTAVE, GAIN_NEAR, GAIN_FAR, 0]
  holds.forEach((h, i) => {
    const track = tracks[i]!
    const key = keyOf(h.expectedHz)
    if (costPrefix.has(key)) return
    const cp = new Float64Array(F + 1)
    const gp = new Float64Array(F + 1)
    for (let j = 0; j < F; j++) {
      const c = frameClass(track.hz[j]!, track.voiced[j]!, h.expectedHz)
      cp[j + 1] = cp[j]! + costTable[c]!
      gp[j + 1] = gp[j]! + gainTable[c]!
    }
    costPrefix.set(key, cp)
    gainPrefix.set(key, gp)
  })
  const cost = holds.map(h => costPrefix.get(keyOf(h.expectedHz))!)
  // Boundaries the take shows, per distinct track, as prefix counts.
  const boundPrefix = new Map<CoarseTrack, { pitch: Float64Array, dip: Float64Array }>()
  for (const tr of tracks) {
    if (boundPrefix.has(tr)) continue
    const bf = boundaryFrames(tr)
    const pitch = new Float64Array(F + 1)
    const dip = new Float64Array(F + 1)
    for (let j = 0; j < F; j++) {
      pitch[j + 1] = pitch[j]! + (bf[j] === BOUNDARY_PITCH ? 1 : 0)
      dip[j + 1] = dip[j]! + (bf[j] === BOUNDARY_DIP ? 1 : 0)
    }
    boundPrefix.set(tr, { pitch, dip })
  }
  const gain = holds.map(h => gainPrefix.get(keyOf(h.expectedHz))!)
  // Frame index whose centre is the first at or after time t (rounding; exact halves do not matter).
  const invHop = 1 / hop
  const fi = (t: number) => {
    const v = Math.floor(t * invHop + 0.5)
    return v < 0 ? 0 : v > F ? F : v
  }

  // ---- Step 1: global affine map by grid search, then a finer local search.
  const t0 = holds[0]!.startS
  const t1 = holds[N - 1]!.endS
  const span = Math.max(1e-3, t1 - t0)
  const minScale = opts.minScale ?? 0.6
  const maxScale = opts.maxScale ?? 1.6
  // Long drills: score a subset of holds in the coarse search.
  const stride = Math.max(1, Math.ceil(N / 64))
  // Each hold's interior (10 % trimmed at both ends), on the drill timeline.
  const inA = Float64Array.from(holds, h => h.startS + 0.1 * (h.endS - h.startS))
  const inB = Float64Array.from(holds, h => h.endS - 0.1 * (h.endS - h.startS))
  const score = (o: number, s: number, step: number): number => {
    let total = 0
    for (let i = 0; i < N; i += step) {
      const a = fi(o + s * inA[i]!)
      const b = fi(o + s * inB[i]!)
      if (b > a) { const g = gain[i]!; total += g[b]! - g[a]! }
    }
    // Ties (e.g. one long hold fits any tempo) go to the drill's own tempo.
    return total - 0.02 * Math.abs(Math.log(s)) * (span / hop)
  }
  let best = { o: -t0, s: 1, v: -Infinity }
  if (opts.map) best = { o: opts.map.offsetS, s: opts.map.timeScale, v: 0 }
  else {
    // Coarse grid: 2 % in scale, 0.1 s in offset (holds are long against both), then a fine pass.
    const nScales = Math.max(2, Math.round(Math.log(maxScale / minScale) / Math.log(1.02)) + 1)
    const oStepCoarse = Math.max(5 * hop, takeDur / 2000)
    for (let k = 0; k < nScales; k++) {
      const s = minScale * Math.pow(maxScale / minScale, k / (nScales - 1))
      const lo = -s * t0 - 0.25 * s * span
      const hi = takeDur - s * t0 - 0.25 * s * span
      for (let o = lo; o <= hi; o += oStepCoarse) {
        const v = score(o, s, stride)
        if (v > best.v) best = { o, s, v }
      }
    }
    {
      let fine = { ...best, v: score(best.o, best.s, 1) }
      const s0 = best.s
      const o0 = best.o
      for (let ds = -0.015; ds <= 0.015 + 1e-9; ds += 0.0015) {
        const s = s0 * (1 + ds)
        // Keep the middle of the drill fixed while the scale moves.
        const oc = o0 + (s0 - s) * (t0 + span / 2)
        for (let q = -1.5 * oStepCoarse; q <= 1.5 * oStepCoarse + 1e-9; q += hop) {
          const v = score(oc + q, s, 1)
          if (v > fine.v) fine = { o: oc + q, s, v }
        }
      }
      best = fine
    }
  }
  const offset = best.o
  const scale = best.s

  // ---- Step 2: segmental DP near the map, on blocks of `step` frames (≥ 30 ms): boundaries
  // finer than that do not matter, since every hold's attack and release are trimmed by ≥ 80 ms.
  const step = Math.max(1, Math.round(0.03 / hop))
  const U = Math.floor(F / step)
  const ub = 1 / (hop * step) // blocks per second
  interface Band { lo: number, hi: number, g: Float64Array, choice: Int32Array, ghi: number }
  const bands: Band[] = []
  let prev = new Float64Array(U + 1)
  let cur = new Float64Array(U + 1)
  const mapped = holds.map(h => ({ a: (offset + scale * h.startS) * ub, b: (offset + scale * h.endS) * ub }))
  for (let i = 0; i < N; i++) {
    const m = mapped[i]!
    const nExp = Math.max(1, m.b - m.a)
    // Room to move: enough for one chord skipped or doubled, at least 2 s.
    const slack = Math.max(2 * ub, 1.1 * nExp)
    const Lmin = Math.max(2, Math.round(Math.max(0.12 * ub, 0.25 * nExp)))
    const Lmax = Math.max(Lmin, Math.round(1.6 * nExp + 0.5 * ub))
    const tol = opts.withinChordS !== undefined && opts.map ? opts.withinChordS * ub : null
    const aMin = Math.max(0, Math.floor(tol === null ? m.a - slack : m.a - tol))
    const aMax = Math.min(U, Math.ceil(tol === null ? m.a + slack : m.b + tol - Lmin))
    const lo = Math.min(U, aMin + Lmin)
    const hi = Math.min(U, aMax + Lmax, tol === null ? U : Math.floor(m.b + tol))
    const bandLen = Math.max(0, hi - lo + 1)
    const g = new Float64Array(bandLen)
    const choice = new Int32Array(bandLen)
    const cpf = cost[i]!
    const cp = new Float64Array(U + 1)
    for (let u = 0; u <= U; u++) cp[u] = cpf[u * step]!
    const bpf = boundPrefix.get(tracks[i]!)!
    // An energy dip alone is what splits a repeated note (elsewhere the pitch change does), and
    // several voices on one part dip as they beat with no new note at all: a dip counts only
    // near where the hold meets the same note under the map (frames).
    const dipWin: Array<[number, number]> = []
    const w = Math.round(REPEAT_DIP_WINDOW_S / hop)
    if (i > 0 && holds[i - 1]!.midi === holds[i]!.midi) dipWin.push([Math.round(m.a * step) - w, Math.round(m.a * step) + w])
    if (i + 1 < N && holds[i + 1]!.midi === holds[i]!.midi) dipWin.push([Math.round(m.b * step) - w, Math.round(m.b * step) + w])
    const margin = Math.max(1, Math.round(BOUNDARY_MARGIN_S / hop))
    const boundaryCost = Math.max(30, nExp * step)
    // Boundaries inside [a, b) blocks, the first and last `margin` frames excepted.
    const inner = (a: number, b: number) => {
      const fa = Math.min(F, a * step + margin)
      const fb = Math.max(0, b * step - margin)
      if (!(fb > fa)) return 0
      let n = bpf.pitch[fb]! - bpf.pitch[fa]!
      for (const [p, q] of dipWin) {
        const lo = Math.max(fa, p, 0)
        const hi = Math.min(fb, q, F)
        if (hi > lo) n += bpf.dip[hi]! - bpf.dip[lo]!
      }
      return n
    }
    const durPen = new Float64Array(Lmax + 1)
    // Duration prior in frame units, so it weighs like the per-frame costs.
    for (let L = Lmin; L <= Lmax; L++) {
      const lr = Math.log(L / nExp)
      durPen[L] = (L < nExp ? DURATION_WEIGHT_SHORT : DURATION_WEIGHT_LONG) * nExp * step * lr * lr
    }
    const posW = POSITION_WEIGHT_PER_S / ub
    for (let b = 0; b < lo; b++) cur[b] = prev[b]!
    for (let b = lo; b <= hi; b++) {
      // Carry (block b−1 lies between holds) or hold i missing.
      let v = b > 0 ? cur[b - 1]! : 0
      let ch = -1
      if (prev[b]! <= v) { v = prev[b]!; ch = -2 }
      const aLo = Math.max(aMin, b - Lmax)
      const aHi = Math.min(aMax, b - Lmin)
      const cpb = cp[b]!
      for (let a = aLo; a <= aHi; a++) {
        const c = prev[a]! + cpb - cp[a]! + durPen[b - a]! + posW * Math.abs(a - m.a) + boundaryCost * inner(a, b)
        if (c < v) { v = c; ch = a }
      }
      cur[b] = v
      g[b - lo] = v
      choice[b - lo] = ch
    }
    const ghi = bandLen > 0 ? cur[hi]! : Infinity
    for (let b = hi + 1; b <= U; b++) cur[b] = Math.min(ghi, prev[b]!)
    bands.push({ lo, hi, g, choice, ghi })
    const t = prev
    prev = cur
    cur = t
  }
  // G_i(b) for any b, from the stored bands (G_-1 ≡ 0).
  const G = (i: number, b: number): number => {
    while (i >= 0) {
      const band = bands[i]!
      if (b >= band.lo && b <= band.hi) return band.g[b - band.lo]!
      if (b > band.hi) return Math.min(band.ghi, G(i - 1, b))
      i--
    }
    return 0
  }
  const placements: HoldPlacement[] = new Array(N)
  let b = U
  for (let i = N - 1; i >= 0; i--) {
    const band = bands[i]!
    let placed = false
    while (true) {
      if (b < band.lo) break // hold i missing here
      if (b > band.hi) {
        if (band.ghi <= G(i - 1, b)) { b = band.hi; continue }
        break
      }
      const ch = band.choice[b - band.lo]!
      if (ch === -2) break
      if (ch === -1) { b--; continue }
      placements[i] = { hold: i, found: true, frameStart: ch * step, frameEnd: b * step, startS: ch * step * hop, endS: b * step * hop }
      b = ch
      placed = true
      break
    }
    if (!placed) {
      const m = mapped[i]!
      placements[i] = { hold: i, found: false, frameStart: -1, frameEnd: -1, startS: m.a / ub, endS: m.b / ub }
    }
  }
  return { offsetS: offset, timeScale: scale, placements }
}
