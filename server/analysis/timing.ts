// Timing of the holds found: where each one starts and ends in the take, whether its start is an
// onset the take shows or only the chord boundary (a tie or a legato repeat), and the take's
// time map fitted robustly to the onsets.
import type { HoldTiming } from '../../shared/types/take'
import type { HoldPlacement } from './align'
import type { CoarseTrack } from './pitch'
import type { ExpectedHold } from './types'

export type { HoldTiming }

export interface TimeMap { offsetS: number, timeScale: number }

interface Found { onsetS: number | null, releaseS: number | null, articulated: boolean }

// Within 0.6 semitone of the note heard (or an octave off: the coarse detector's slips).
const near = (hz: number, refHz: number) => {
  if (!(hz > 0)) return false
  const d = 12 * Math.log2(hz / refHz)
  const oct = Math.round(d / 12)
  return Math.abs(oct) <= 1 && Math.abs(d - 12 * oct) <= 0.6
}

/**
 * Onset and release of every placed hold from its coarse track: the first frame near the note
 * heard there (the median pitch of the placed frames, which for a wrong note is not the expected
 * one) at ≥ 15 % of the hold's median level (a horn or a sung "oo" swells for a few tenths of a
 * second after it starts) and the last at ≥ 30 %, searched from
 * `lookBackS` (0.15 s) before to 0.3 s after the placed start (and to 0.25 s after the placed end). A hold that
 * directly follows the same note with no boundary (pitch change, energy dip) between them was
 * not re-articulated: its start is only the chord boundary.
 */
export function findOnsets (tracks: CoarseTrack[], placements: HoldPlacement[], holds: ExpectedHold[], bounds: Uint8Array[], lookBackS = 0.15): Found[] {
  return placements.map((p, i) => {
    if (!p.found) return { onsetS: null, releaseS: null, articulated: false }
    const tr = tracks[i]!
    const h = holds[i]!
    const F = tr.times.length
    const hop = tr.hopS
    const heard: number[] = []
    for (let j = p.frameStart; j < p.frameEnd && j < F; j++) if (tr.voiced[j]) heard.push(tr.hz[j]!)
    if (heard.length < 3) return { onsetS: null, releaseS: null, articulated: false }
    heard.sort((x, y) => x - y)
    const refHz = heard[heard.length >> 1]!
    const lv: number[] = []
    for (let j = p.frameStart; j < p.frameEnd && j < F; j++) if (tr.voiced[j] && near(tr.hz[j]!, refHz)) lv.push(tr.energy[j]!)
    if (lv.length < 3) return { onsetS: null, releaseS: null, articulated: false }
    lv.sort((a, b) => a - b)
    const thr = 0.3 * lv[lv.length >> 1]!
    const ok = (j: number, level = thr) => tr.voiced[j] === 1 && near(tr.hz[j]!, refHz) && tr.energy[j]! >= level
    let on = -1
    let a = Math.max(0, p.frameStart - Math.round(lookBackS / hop))
    const b = Math.min(F - 1, p.frameStart + Math.round(0.3 / hop))
    // A repeated note placed right after the same note: the frames before its start are the
    // previous note's tail, so the search starts after the lowest level near the start (the
    // re-articulation's dip).
    const before = i > 0 ? placements[i - 1]! : null
    if (before && before.found && holds[i - 1]!.midi === h.midi && (p.frameStart - before.frameEnd) * hop < 0.1) {
      let low = a
      for (let j = a; j <= Math.min(F - 1, p.frameStart + Math.round(0.15 / hop)); j++) if (tr.energy[j]! < tr.energy[low]!) low = j
      a = Math.min(b, low + 1)
    }
    const onThr = thr / 2
    for (let j = a; j <= b; j++) if (ok(j, onThr)) { on = j; break }
    let off = -1
    const c = Math.min(F - 1, p.frameEnd - 1 + Math.round(0.25 / hop))
    for (let j = c; j >= Math.max(0, p.frameEnd - 1 - Math.round(0.3 / hop)); j--) if (ok(j)) { off = j; break }
    // Re-articulated? Only a question when the previous hold is the same note, placed right before.
    const prev = i > 0 ? placements[i - 1]! : null
    let articulated = true
    if (prev && prev.found && holds[i - 1]!.midi === h.midi && (p.frameStart - prev.frameEnd) * hop < 0.1) {
      const bf = bounds[i]!
      articulated = false
      const w = Math.round(0.12 / hop)
      for (let j = Math.max(0, p.frameStart - w); j <= Math.min(F - 1, p.frameStart + w); j++) if (bf[j]) { articulated = true; break }
      // A gap of unvoiced frames between them is a re-articulation too (a breath, a stop).
      if (!articulated) {
        for (let j = Math.max(0, prev.frameEnd - w); j <= Math.min(F - 1, p.frameStart + w); j++) if (!tr.voiced[j] || tr.energy[j]! < thr) { articulated = true; break }
      }
    }
    return {
      onsetS: on >= 0 && articulated ? tr.times[on]! - hop / 2 : null,
      releaseS: off >= 0 ? tr.times[off]! + hop / 2 : null,
      articulated,
    }
  })
}

/**
 * The take's map t_take = offsetS + timeScale·t_drill from the onsets found (chord start on the
 * drill against onset in the take): Theil–Sen slope (median of the pairwise slopes of onsets at
 * least 0.5 s apart on the drill, each weighted by its span) and the median intercept, so a
 * missing, extra or late chord does not tip it. Null with fewer than three onsets or a slope
 * outside 0.6–1.6.
 */
export function fitTimeMap (pairs: Array<{ drillS: number, takeS: number }>): TimeMap | null {
  if (pairs.length < 3) return null
  const slopes: Array<{ v: number, w: number }> = []
  for (let i = 0; i < pairs.length; i++) {
    for (let j = i + 1; j < pairs.length; j++) {
      const dx = pairs[j]!.drillS - pairs[i]!.drillS
      if (Math.abs(dx) >= 0.5) slopes.push({ v: (pairs[j]!.takeS - pairs[i]!.takeS) / dx, w: Math.abs(dx) })
    }
  }
  if (slopes.length < 2) return null
  const s = weightedMedian(slopes)
  if (!(s >= 0.6 && s <= 1.6)) return null
  const o = median(pairs.map(p => p.takeS - s * p.drillS))
  return { offsetS: o, timeScale: s }
}

/** Timing of each hold against the map (onset late or early against its beat). */
export function holdTiming (found: Found, hold: ExpectedHold, map: TimeMap): HoldTiming {
  const beat = map.offsetS + map.timeScale * hold.startS
  return {
    onsetS: found.onsetS === null ? null : round3(found.onsetS),
    releaseS: found.releaseS === null ? null : round3(found.releaseS),
    start: found.onsetS === null ? 'chord_boundary' : 'onset',
    fromBeatS: found.onsetS === null ? null : round3(found.onsetS - beat),
  }
}

function median (v: number[]): number {
  const s = [...v].sort((a, b) => a - b)
  const m = s.length >> 1
  return s.length % 2 ? s[m]! : (s[m - 1]! + s[m]!) / 2
}

// Weighted median: a pair's slope weighs as much as its span on the drill, since a timing error
// of one frame tilts a short pair far more than a long one (weighted Theil–Sen).
function weightedMedian (v: Array<{ v: number, w: number }>): number {
  const s = [...v].sort((a, b) => a.v - b.v)
  const half = s.reduce((acc, x) => acc + x.w, 0) / 2
  let acc = 0
  for (const x of s) { acc += x.w; if (acc >= half) return x.v }
  return s[s.length - 1]!.v
}

function round3 (v: number): number {
  return Math.round(v * 1000) / 1000
}

/** Where the take sounds at all: its first and last sounding frames. */
export interface SoundExtent { startS: number, endS: number }

export interface ChordMapOptions {
  /** Where the take sounds (a chord start is an onset from silence, and nothing starts once it ends). */
  sound?: SoundExtent
  /** End of the drill's last chord. */
  drillEndS?: number
}

/**
 * The take's map from where it changes at all (the whole chord's onsets: every part moves at a
 * chord change) against the drill's chord starts: the offset and tempo (0.8–1.25 of the drill's,
 * in 0.5 % steps) that best explain the onsets, refined by a robust fit to the chord starts that
 * meet one. A chord start within 0.1 s of an onset scores 0.7–1 (less the farther it lands), so
 * among maps meeting as many onsets the one with the smaller misses wins. When chords are of
 * equal length a map one chord late or early can meet as many onsets (an extra onset, or one at
 * the final release, fills the gap), so with the take's sound extent known the score also loses
 * one per chord length of drill mapped where the take is silent (before its first sound or after
 * its last) and a half per chord length of sound outside the drill (more than 0.25 s before the
 * first chord, more than 1 s of ring after the last); an onset with less than 40 % of the
 * shortest chord still to sound after it is no chord start, and the take's first sound is one.
 * Ties go to the tempo nearest the drill's. Null when fewer than half the chords (and fewer than
 * three) meet an onset.
 */
export function mapFromOnsets (onsetsS: number[], chordStartsS: number[], opts: ChordMapOptions = {}): TimeMap | null {
  const starts = [...new Set(chordStartsS)].sort((a, b) => a - b)
  if (starts.length < 3) return null
  const sound = opts.sound
  const endD = opts.drillEndS !== undefined && opts.drillEndS > starts[starts.length - 1]! ? opts.drillEndS : null
  let shortest = Infinity
  for (let k = 1; k < starts.length; k++) shortest = Math.min(shortest, starts[k]! - starts[k - 1]!)
  if (endD !== null) shortest = Math.min(shortest, endD - starts[starts.length - 1]!)
  let on = [...onsetsS].filter(Number.isFinite)
  if (sound) {
    // At the slowest tempo searched, a chord start has at least 40 % of the shortest chord to run.
    const tail = 0.4 * 0.8 * shortest
    on = on.filter(t => t < sound.endS - tail)
    if (!on.some(t => Math.abs(t - sound.startS) <= 0.1)) on.push(sound.startS)
  }
  on.sort((a, b) => a - b)
  if (on.length < 3) return null
  const nearest = (t: number) => {
    let lo = 0
    let hi = on.length - 1
    while (hi - lo > 1) { const mid = (lo + hi) >> 1; if (on[mid]! < t) lo = mid; else hi = mid }
    return Math.abs(on[lo]! - t) < Math.abs(on[hi]! - t) ? on[lo]! : on[hi]!
  }
  const lenD = endD !== null ? (endD - starts[0]!) / starts.length : (starts[starts.length - 1]! - starts[0]!) / (starts.length - 1)
  // One per chord length of drill where the take is silent, a half per chord length of sound
  // outside the drill (sampled and real notes ring on after the last release).
  const edge = (o: number, s: number) => {
    if (!sound) return 0
    const first = o + s * starts[0]!
    let pen = Math.max(0, sound.startS - 0.15 - first) + 0.5 * Math.max(0, first - sound.startS - 0.25)
    if (endD !== null) {
      const last = o + s * endD
      pen += Math.max(0, last - sound.endS - 0.3) + 0.5 * Math.max(0, sound.endS - last - 1)
    }
    return pen / (s * lenD)
  }
  let best = { v: -Infinity, hits: 0, o: 0, s: 1 }
  for (let s = 0.8; s <= 1.25 + 1e-9; s *= 1.005) {
    for (const t of on) {
      for (const d of starts) {
        const o = t - s * d
        let hits = 0
        let v = 0
        for (const d2 of starts) {
          const m = o + s * d2
          const r = Math.abs(nearest(m) - m) / 0.1
          if (r <= 1) { hits++; v += 1 - 0.3 * r * r }
        }
        v -= edge(o, s)
        if (v > best.v + 1e-9 || (Math.abs(v - best.v) <= 1e-9 && Math.abs(Math.log(s)) < Math.abs(Math.log(best.s)))) best = { v, hits, o, s }
      }
    }
  }
  if (best.hits < Math.max(3, 0.5 * starts.length)) return null
  const pairs = starts.flatMap((d) => {
    const t = best.o + best.s * d
    const n = nearest(t)
    return Math.abs(n - t) <= 0.1 ? [{ drillS: d, takeS: n }] : []
  })
  return fitTimeMap(pairs) ?? { offsetS: best.o, timeScale: best.s }
}
