import { Interval } from '@tonaljs/tonal'
import { Ratio } from './ratio'

/** How a chord's minor seventh is tuned in just systems. */
export type SeventhOption = 'harmonic' | '5-limit'

const r = (n: number, d: number) => new Ratio(BigInt(n), BigInt(d))

// 5-limit ratios above a chord root by spelled simple interval (common practice): major third 5/4,
// minor third 6/5, fifth 3/2, diminished fifth 64/45, augmented fifth 25/16, major sixth 5/3,
// minor sixth 8/5, major seventh 15/8, diminished seventh 128/75, seconds 9/8 and 16/15, fourth 4/3.
// The minor seventh depends on the chord (see seventhRatio).
const PURE: Record<string, Ratio> = {
  '1P': r(1, 1), '1A': r(25, 24),
  '2m': r(16, 15), '2M': r(9, 8), '2A': r(75, 64),
  '3d': r(256, 225), '3m': r(6, 5), '3M': r(5, 4), '3A': r(125, 96),
  '4d': r(32, 25), '4P': r(4, 3), '4A': r(45, 32),
  '5d': r(64, 45), '5P': r(3, 2), '5A': r(25, 16),
  '6d': r(192, 125), '6m': r(8, 5), '6M': r(5, 3), '6A': r(225, 128),
  '7d': r(128, 75), '7M': r(15, 8),
}

const simple = (iv: string) => {
  const i = Interval.get(iv)
  return `${(i.step ?? 0) + 1}${i.q}`
}

/**
 * The minor seventh above a chord root. Minor-seventh chords take 9/5 (a pure minor third above the
 * fifth, 10:12:15:18); half-diminished sevenths 16/9 (a pure major third above the diminished fifth
 * 64/45); dominant and suspended sevenths 7/4 with the 'harmonic' option (4:5:6:7) or 16/9 with
 * '5-limit' (36:45:54:64).
 */
export function seventhRatio(chordIntervals: string[], option: SeventhOption): Ratio {
  const ivs = new Set(chordIntervals.map(simple))
  if (ivs.has('3m') && ivs.has('5d')) return r(16, 9)
  if (ivs.has('3m')) return r(9, 5)
  return option === 'harmonic' ? r(7, 4) : r(16, 9)
}

/** Pure ratio (within one octave) of a spelled simple interval above the root of a chord; null if we have none. */
export function pureRatio(interval: string, chordIntervals: string[], option: SeventhOption): Ratio | null {
  if (interval === '7m') return seventhRatio(chordIntervals, option)
  return PURE[interval] ?? null
}

/**
 * The fixed 5-limit scales of just-tonic, indexed by semitones above the tonic. Diatonic degrees:
 * major 1, 9/8, 5/4, 4/3, 3/2, 5/3, 15/8; minor 1, 9/8, 6/5, 4/3, 3/2, 8/5, 9/5. Chromatic degrees
 * (our choice, all 5-limit): 16/15, 6/5 or 5/4, 45/32, 8/5 or 5/3, 16/9 in major (the fourth above
 * the fourth, so the tonic's own dominant seventh is 5-limit pure), 15/8 in minor (leading tone).
 */
export const TONIC_SCALES: Record<'major' | 'minor', readonly Ratio[]> = {
  major: [r(1, 1), r(16, 15), r(9, 8), r(6, 5), r(5, 4), r(4, 3), r(45, 32), r(3, 2), r(8, 5), r(5, 3), r(16, 9), r(15, 8)],
  minor: [r(1, 1), r(16, 15), r(9, 8), r(6, 5), r(5, 4), r(4, 3), r(45, 32), r(3, 2), r(8, 5), r(5, 3), r(9, 5), r(15, 8)],
}
