import { TuningError } from './errors'

const gcd = (a: bigint, b: bigint): bigint => {
  a = a < 0n ? -a : a
  b = b < 0n ? -b : b
  while (b) [a, b] = [b, a % b]
  return a
}

/** log2 of a positive bigint without losing precision on numbers beyond 2^53. */
function log2Big(n: bigint): number {
  if (n <= 9007199254740991n) return Math.log2(Number(n))
  const bits = n.toString(2).length
  if (bits <= 53) return Math.log2(Number(n))
  const shift = BigInt(bits - 53)
  return Math.log2(Number(n >> shift)) + Number(shift)
}

/** An exact positive or negative fraction n/d in lowest terms (bigint, so powers of 3 and 5 never round). */
export class Ratio {
  readonly n: bigint
  readonly d: bigint

  constructor(n: bigint | number, d: bigint | number = 1n) {
    let nn = BigInt(n)
    let dd = BigInt(d)
    if (dd === 0n) throw new TuningError('bad_ratio', 'A ratio cannot have a zero denominator')
    if (dd < 0n) { nn = -nn; dd = -dd }
    const g = gcd(nn, dd) || 1n
    this.n = nn / g
    this.d = dd / g
  }

  static readonly ONE = new Ratio(1n)
  static readonly TWO = new Ratio(2n)

  /** Parses "5/4", "3" or "3/1"; anything else throws. */
  static parse(text: string): Ratio {
    const m = /^\s*(\d+)\s*(?:\/\s*(\d+))?\s*$/.exec(text)
    if (!m) throw new TuningError('bad_ratio', `"${text}" is not a ratio such as 5/4`)
    return new Ratio(BigInt(m[1]!), BigInt(m[2] ?? '1'))
  }

  /** The nearest fraction to x with a denominator up to maxDen (continued fractions). */
  static approximate(x: number, maxDen = 1_000_000): Ratio {
    if (!Number.isFinite(x)) throw new TuningError('bad_ratio', `${x} is not a finite number`)
    const sign = x < 0 ? -1n : 1n
    let v = Math.abs(x)
    let [h0, h1, k0, k1] = [0n, 1n, 1n, 0n]
    for (let i = 0; i < 40; i++) {
      const a = Math.floor(v)
      const h2 = BigInt(a) * h1 + h0
      const k2 = BigInt(a) * k1 + k0
      if (k2 > BigInt(maxDen)) break
      ;[h0, h1, k0, k1] = [h1, h2, k1, k2]
      const frac = v - a
      if (frac < 1e-12) break
      v = 1 / frac
    }
    return new Ratio(sign * h1, k1)
  }

  mul(o: Ratio): Ratio { return new Ratio(this.n * o.n, this.d * o.d) }
  div(o: Ratio): Ratio { return new Ratio(this.n * o.d, this.d * o.n) }

  /** This ratio to an integer power (negative powers allowed). */
  pow(k: number): Ratio {
    if (!Number.isInteger(k)) throw new TuningError('bad_ratio', 'A ratio power must be a whole number')
    const e = BigInt(Math.abs(k))
    return k >= 0 ? new Ratio(this.n ** e, this.d ** e) : new Ratio(this.d ** e, this.n ** e)
  }

  /** This ratio times 2^k. */
  octaves(k: number): Ratio { return this.mul(Ratio.TWO.pow(k)) }

  /** The same interval moved by octaves into [1/1, 2/1). */
  reduceOctave(): Ratio {
    if (this.n <= 0n) throw new TuningError('bad_ratio', `${this} is not a positive ratio`)
    const k = Math.floor(this.cents() / 1200 + 1e-12)
    let r = this.octaves(-k)
    // Guard the float estimate at exact octave boundaries.
    while (r.n >= 2n * r.d) r = r.octaves(-1)
    while (r.n < r.d) r = r.octaves(1)
    return r
  }

  isPositive(): boolean { return this.n > 0n }
  isInteger(): boolean { return this.d === 1n }
  equals(o: Ratio): boolean { return this.n === o.n && this.d === o.d }

  /** Size in cents, 1200·log2(n/d). */
  cents(): number {
    if (this.n <= 0n) throw new TuningError('bad_ratio', `${this} is not a positive ratio`)
    return 1200 * (log2Big(this.n) - log2Big(this.d))
  }

  toNumber(): number { return Number(this.n) / Number(this.d) }
  toString(): string { return `${this.n}/${this.d}` }
}

/** Parses a ratio given as a string or as a plain fraction-valued number (0.25 → 1/4). */
export function toRatio(value: string | number): Ratio {
  return typeof value === 'number' ? Ratio.approximate(value) : Ratio.parse(value)
}

/** Size of the ratio n/d in cents: 1200·log2(n/d). Throws on non-positive or non-finite input. */
export function ratioCents(n: number | bigint, d: number | bigint = 1): number {
  if (typeof n === 'bigint' && typeof d === 'bigint') return new Ratio(n, d).cents()
  const nn = Number(n)
  const dd = Number(d)
  if (!Number.isFinite(nn) || !Number.isFinite(dd) || nn <= 0 || dd <= 0) {
    throw new TuningError('bad_ratio', `${String(n)}/${String(d)} is not a ratio of two positive numbers`)
  }
  return 1200 * Math.log2(nn / dd)
}

/** The named commas and small intervals the engine reports; exact by definition. */
export const COMMAS = {
  syntonic: new Ratio(81n, 80n),
  pythagorean: new Ratio(3n ** 12n, 2n ** 19n),
  schisma: new Ratio(32805n, 32768n),
  diaschisma: new Ratio(2048n, 2025n),
  lesserDiesis: new Ratio(128n, 125n),
  greaterDiesis: new Ratio(648n, 625n),
  septimal: new Ratio(64n, 63n),
} as const

const COMMA_NAMES: Record<keyof typeof COMMAS, string> = {
  syntonic: 'a syntonic comma',
  pythagorean: 'a Pythagorean comma',
  schisma: 'a schisma',
  diaschisma: 'a diaschisma',
  lesserDiesis: 'a lesser diesis',
  greaterDiesis: 'a greater diesis',
  septimal: 'a septimal comma',
}

/** Names the comma that separates two ratios ("a syntonic comma"), or null when it is none of the known ones. */
export function commaName(a: Ratio, b: Ratio): { name: string, ratio: Ratio } | null {
  const q = a.cents() >= b.cents() ? a.div(b) : b.div(a)
  for (const key of Object.keys(COMMAS) as (keyof typeof COMMAS)[]) {
    if (q.equals(COMMAS[key])) return { name: COMMA_NAMES[key], ratio: COMMAS[key] }
  }
  return null
}
