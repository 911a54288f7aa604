import { TuningError } from './errors'
import { TONIC_SCALES } from './just'
import type { ParsedPc } from './pitch'
import { mod, parsePitchClass } from './pitch'
import { COMMAS, Ratio } from './ratio'
import type { ScalaScale } from './scala'

/** Where a fixed system puts one note: cents from equal temperament and the exact ratio to the tonic anchor. */
export interface Placement {
  dev: number
  /** Ratio to the tonic in octave 4 (the anchor, at its equal-tempered frequency), when rational. */
  exact: Ratio | null
}

/** A 12-note (or Scala) tuning fixed on a tonic; the tonic in octave 4 sits at its equal-tempered frequency. */
export interface FixedTuning {
  tonic: ParsedPc
  description: string
  /** Placement of a MIDI note, or null when the scale has no degree for it. */
  place(midi: number): Placement | null
  /** The fifth that is out of tune in a 12-note chain (from `lower` up to `upper`). */
  wolf: { lower: string, upper: string, lowerChroma: number, upperChroma: number, cents: number } | null
  /** Twelve degrees above the tonic plus the period, for export; null for Scala scales of other sizes. */
  table: { cents: number, ratio: Ratio | null }[] | null
}

const THREE_HALVES = new Ratio(3n, 2n)
const FIFTH_CENTS = THREE_HALVES.cents()
const SYNTONIC_CENTS = COMMAS.syntonic.cents()

/** The tonic anchor: the tonic's pitch class in octave 4. */
export const anchorMidi = (tonic: ParsedPc) => 60 + tonic.chroma

function tableTuning(tonic: ParsedPc, description: string, degrees: { cents: number, ratio: Ratio | null }[], period: { cents: number, ratio: Ratio | null }): FixedTuning {
  const t4 = anchorMidi(tonic)
  return {
    tonic,
    description,
    wolf: null,
    table: [...degrees.slice(1), period],
    place(midi) {
      const x = midi - t4
      const p = Math.floor(x / 12)
      const k = x - 12 * p
      const deg = degrees[k]!
      const dev = deg.cents + p * period.cents - 100 * x
      const exact = deg.ratio && period.ratio ? deg.ratio.mul(period.ratio.pow(p)) : null
      return { dev, exact }
    },
  }
}

/** Name of the pitch class `f` fifths from C on the line of fifths (0 = C, 1 = G, −1 = F). */
export function pcFromFifths(f: number): string {
  const letter = 'FCGDAEB'[mod(f + 1, 7)]!
  const alt = Math.floor((f + 1) / 7)
  return letter + (alt < 0 ? 'b'.repeat(-alt) : '#'.repeat(alt))
}

export interface ChainOptions {
  start?: string
  wolf?: string
  mode: 'major' | 'minor'
}

/**
 * Places the twelve pitch classes on a chain of fifths. Without options the chain starts three fifths
 * below a major tonic (E♭ for C) or four below a minor one (A♭ for C minor), so the key's own chords
 * avoid the wolf; `start` alone puts the wolf 11 fifths above it; `wolf` names the note whose fifth
 * above is the wolf. Returns each chroma's position in fifths relative to the tonic.
 */
function chain(tonic: ParsedPc, opts: ChainOptions) {
  const start = opts.start ? parsePitchClass(opts.start, 'system.start') : null
  const wolf = opts.wolf ? parsePitchClass(opts.wolf, 'system.wolf') : null
  let startFifths: number
  if (start) startFifths = start.fifths
  // A named wolf alone: spell the chain so that it contains the tonic (wolf D♭ in C: A♭ … C♯).
  else if (wolf) startFifths = wolf.fifths - 11 + 12 * Math.ceil((tonic.fifths - 11 - (wolf.fifths - 11)) / 12)
  else startFifths = tonic.fifths - (opts.mode === 'minor' ? 4 : 3)
  const startChroma = mod(7 * startFifths, 12)
  // Fifths up from the start to each chroma (7 is its own inverse modulo 12).
  const up = (chroma: number) => mod(7 * (chroma - startChroma), 12)
  const top = wolf ? up(wolf.chroma) : 11
  const abs = (chroma: number) => (up(chroma) <= top ? up(chroma) : up(chroma) - 12)
  const tonicAbs = abs(tonic.chroma)
  const fifthsFromTonic = (k: number) => abs(mod(tonic.chroma + k, 12)) - tonicAbs
  const lowerChroma = mod(startChroma + 7 * top, 12)
  const upperChroma = mod(lowerChroma + 7, 12)
  return {
    fifthsFromTonic,
    wolfNames: wolf
      ? { lower: wolf.pc, upper: pcFromFifths(wolf.fifths + 1), lowerChroma, upperChroma }
      : { lower: pcFromFifths(startFifths + top), upper: pcFromFifths(startFifths + top - 11), lowerChroma, upperChroma },
    startName: pcFromFifths(startFifths),
  }
}

/** Pythagorean tuning: a chain of pure 3/2 fifths with one wolf. */
export function pythagorean(tonic: ParsedPc, opts: ChainOptions): FixedTuning {
  const c = chain(tonic, opts)
  const degrees = Array.from({ length: 12 }, (_, k) => {
    const f = c.fifthsFromTonic(k)
    const o = (7 * f - k) / 12
    return { cents: 100 * k + f * (FIFTH_CENTS - 700), ratio: THREE_HALVES.pow(f).octaves(-o) }
  })
  const t = tableTuning(tonic, `Pythagorean, chain of pure fifths from ${c.startName}, wolf ${c.wolfNames.lower}–${c.wolfNames.upper}, tonic ${tonic.pc}`, degrees, { cents: 1200, ratio: Ratio.TWO })
  t.wolf = { ...c.wolfNames, cents: 8400 - 11 * FIFTH_CENTS }
  return t
}

/** Meantone: every fifth narrowed by `fraction` of the syntonic comma (1/4 by default), with one wolf. */
export function meantone(tonic: ParsedPc, fraction: Ratio, opts: ChainOptions): FixedTuning {
  if (!(fraction.n > 0n) || fraction.n > fraction.d) {
    throw new TuningError('bad_fraction', `The meantone fraction must be above 0 and at most 1 (got ${fraction})`, 'system.fraction')
  }
  const c = chain(tonic, opts)
  const fifth = FIFTH_CENTS - fraction.toNumber() * SYNTONIC_CENTS
  const degrees = Array.from({ length: 12 }, (_, k) => {
    const f = c.fifthsFromTonic(k)
    const o = (7 * f - k) / 12
    // (3/2)^f · (80/81)^(x·f) is rational exactly when x·f is a whole number (e.g. 4 fifths of 1/4 comma).
    const xf = fraction.mul(new Ratio(BigInt(f)))
    const ratio = xf.isInteger()
      ? THREE_HALVES.pow(f).mul(COMMAS.syntonic.pow(-Number(xf.n))).octaves(-o)
      : null
    return { cents: 100 * k + f * (fifth - 700), ratio }
  })
  const t = tableTuning(tonic, `Meantone, fifths narrowed by ${fraction} syntonic comma, wolf ${c.wolfNames.lower}–${c.wolfNames.upper}, tonic ${tonic.pc}`, degrees, { cents: 1200, ratio: Ratio.TWO })
  t.wolf = { ...c.wolfNames, cents: 8400 - 11 * fifth }
  return t
}

/** The size of a meantone fifth in cents for a comma fraction: 1200·log2(3/2) − x·1200·log2(81/80). */
export function meantoneFifth(fraction: Ratio): number {
  return FIFTH_CENTS - fraction.toNumber() * SYNTONIC_CENTS
}

/** Just intonation from the key's tonic: the fixed 5-limit scale of TONIC_SCALES. */
export function justTonic(tonic: ParsedPc, mode: 'major' | 'minor'): FixedTuning {
  const degrees = TONIC_SCALES[mode].map(ratio => ({ cents: ratio.cents(), ratio }))
  return tableTuning(tonic, `Just intonation, 5-limit ${mode} scale on ${tonic.pc}`, degrees, { cents: 1200, ratio: Ratio.TWO })
}

/** Largest distance in cents at which a note is taken as a degree of a Scala scale that is not 12 to the octave. */
export const SCALA_SNAP_CENTS = 50

/**
 * A Scala scale on a tonic. Scales of 12 pitches with an octave-sized period map key by key (the
 * semitone above the tonic plays degree 1, and so on); other scales map each note to the nearest
 * degree within 50 ¢ and leave the rest unplaced.
 */
export function scalaTuning(tonic: ParsedPc, scale: ScalaScale): FixedTuning {
  if (scale.degrees.length === 0) throw new TuningError('bad_scala', 'The Scala scale has no pitches besides 1/1', 'system.scala')
  const period = scale.degrees[scale.degrees.length - 1]!
  if (!(period.cents > 0)) throw new TuningError('bad_scala', 'The last pitch of a Scala scale is its period and must be above 1/1', 'system.scala')
  const degrees = [{ cents: 0, ratio: Ratio.ONE as Ratio | null }, ...scale.degrees.slice(0, -1)]
  const description = `Scala: ${scale.description || 'untitled scale'}, tonic ${tonic.pc}`
  if (scale.degrees.length === 12 && Math.abs(period.cents - 1200) <= 50) {
    return tableTuning(tonic, description, degrees, period)
  }
  const t4 = anchorMidi(tonic)
  const ring = [...degrees, { cents: period.cents, ratio: period.ratio }]
  return {
    tonic,
    description,
    wolf: null,
    table: null,
    place(midi) {
      const x = 100 * (midi - t4)
      let p = Math.floor(x / period.cents)
      const y = x - p * period.cents
      let best = 0
      for (let j = 1; j < ring.length; j++) {
        if (Math.abs(ring[j]!.cents - y) < Math.abs(ring[best]!.cents - y)) best = j
      }
      if (Math.abs(ring[best]!.cents - y) > SCALA_SNAP_CENTS) return null
      let deg = ring[best]!
      if (best === ring.length - 1) { p += 1; deg = ring[0]! }
      const dev = deg.cents + p * period.cents - x
      const exact = deg.ratio && period.ratio ? deg.ratio.mul(period.ratio.pow(p)) : null
      return { dev, exact }
    },
  }
}
