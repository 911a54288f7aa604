// The diverging flat/sharp scale every deviation in the product is shown with: flat is cool blue,
// sharp is warm amber, inside tolerance is neutral slate. Colour is never the only cue: every
// swatch sits beside a signed number, and the direction is also given as a word.
// Pure TypeScript (no Vue) so components, charts and tests share one table.

/** The true minus sign (U+2212), wider and clearer than a hyphen beside digits. */
export const MINUS = '\u2212'

export type Direction = 'flat' | 'sharp' | 'in-tune' | 'none'
export type SignedToken = 'flat-3' | 'flat-2' | 'flat-1' | 'in-tune' | 'sharp-1' | 'sharp-2' | 'sharp-3'
/** Steps for unsigned sizes (mean absolute deviation), which have no direction. */
export type MagnitudeToken = 'in-tune' | 'off-1' | 'off-2' | 'off-3'
export type DeviationToken = SignedToken | MagnitudeToken | 'none'

export interface Swatch {
  /** Fill colour (charts, badge backgrounds). */
  fill: string
  /** Text colour to write on the fill (WCAG AA, at least 4.5:1). */
  onFill: string
}

/** Paper-like surfaces and ink; the Tailwind theme reads the same values. */
export const SURFACES = {
  paper: '#f8f5ee',
  raised: '#fffdf8',
  sunk: '#efeadf',
  rule: '#ddd5c6',
  /** Borders of inputs and buttons: at least 3:1 on paper (WCAG non-text contrast). */
  control: '#8c8578',
  ink: '#1f2023',
  muted: '#555a61',
  accent: '#2c4a6e',
} as const

/** Dark text colours for a direction written on paper (numbers in tables, trace labels). */
export const DIRECTION_INK: Record<Direction, string> = {
  'flat': '#1d4c86',
  'sharp': '#834a05',
  'in-tune': '#4a5562',
  'none': '#555a61',
}

export const SWATCHES: Record<DeviationToken, Swatch> = {
  'flat-3': { fill: '#1f4e8c', onFill: '#ffffff' },
  'flat-2': { fill: '#6f9bd0', onFill: '#1f2023' },
  'flat-1': { fill: '#cadcf0', onFill: '#1f2023' },
  'in-tune': { fill: '#d8dde3', onFill: '#1f2023' },
  'sharp-1': { fill: '#f4ddb2', onFill: '#1f2023' },
  'sharp-2': { fill: '#e1a440', onFill: '#1f2023' },
  'sharp-3': { fill: '#94560a', onFill: '#ffffff' },
  'off-1': { fill: '#e7e1d6', onFill: '#1f2023' },
  'off-2': { fill: '#c4bcae', onFill: '#1f2023' },
  'off-3': { fill: '#5f5950', onFill: '#ffffff' },
  'none': { fill: '#ece8e0', onFill: '#555a61' },
}

/**
 * Step boundaries as multiples of the tolerance: step 1 up to 2× the tolerance, step 2 up to 4×,
 * step 3 beyond. Relative to the tolerance so a strict drill (±3 ¢) and a lenient one (±15 ¢)
 * both use the whole scale.
 */
export const STEP_FACTORS = [2, 4] as const

export interface Classified {
  direction: Direction
  /** 0 inside tolerance or no pitch, 1..3 growing with the size beyond it. */
  step: 0 | 1 | 2 | 3
  token: DeviationToken
}

/** Rounds to the displayed precision so the colour never disagrees with the printed number. */
function shown(cents: number, digits: number): number {
  const f = 10 ** digits
  return Math.round(cents * f) / f
}

function safeTolerance(tolerance: number): number {
  return Number.isFinite(tolerance) && tolerance > 0 ? tolerance : 0
}

function stepOf(size: number, tolerance: number): 1 | 2 | 3 {
  if (size <= tolerance * STEP_FACTORS[0]) return 1
  if (size <= tolerance * STEP_FACTORS[1]) return 2
  return 3
}

/** Direction and step of a signed deviation in cents (negative = flat) against ± tolerance. */
export function classifyDeviation(cents: number | null | undefined, tolerance: number, digits = 1): Classified {
  if (cents == null || !Number.isFinite(cents)) return { direction: 'none', step: 0, token: 'none' }
  const c = shown(cents, digits)
  const tol = safeTolerance(tolerance)
  if (Math.abs(c) <= tol) return { direction: 'in-tune', step: 0, token: 'in-tune' }
  const step = stepOf(Math.abs(c), tol)
  return c < 0
    ? { direction: 'flat', step, token: `flat-${step}` }
    : { direction: 'sharp', step, token: `sharp-${step}` }
}

/** Step of an unsigned size (mean absolute deviation) against the tolerance; no direction. */
export function classifyMagnitude(cents: number | null | undefined, tolerance: number, digits = 1): Classified {
  if (cents == null || !Number.isFinite(cents)) return { direction: 'none', step: 0, token: 'none' }
  const c = Math.abs(shown(cents, digits))
  const tol = safeTolerance(tolerance)
  if (c <= tol) return { direction: 'in-tune', step: 0, token: 'in-tune' }
  const step = stepOf(c, tol)
  return { direction: 'none', step, token: `off-${step}` }
}

/**
 * The one number format: a real minus sign (U+2212), "+" in front of positive values when
 * `signed`, never "−0.0", then the unit; `missing` for null or a non-number.
 * formatNumber(-6.24, 1, '¢', { signed: true }) → "−6.2 ¢".
 */
export function formatNumber(value: number | null | undefined, digits: number, unit = '', opts: { signed?: boolean, missing?: string } = {}): string {
  if (value == null || !Number.isFinite(value)) return opts.missing ?? '—'
  const c = shown(value, digits)
  const body = Math.abs(c).toFixed(digits)
  const sign = c < 0 ? MINUS : c > 0 && opts.signed ? '+' : ''
  return unit ? `${sign}${body} ${unit}` : `${sign}${body}`
}

/** "−6.2 ¢", "+3.0 ¢", "0.0 ¢" (never "−0.0 ¢"); null or a non-number gives "no pitch found". */
export function formatCents(cents: number | null | undefined, digits = 1): string {
  return formatNumber(cents, digits, '¢', { signed: true, missing: 'no pitch found' })
}

/** An unsigned size such as a mean absolute deviation: "6.2 ¢". */
export function formatAbsCents(cents: number | null | undefined, digits = 1): string {
  if (cents == null || !Number.isFinite(cents)) return 'no pitch found'
  return `${Math.abs(shown(cents, digits)).toFixed(digits)} ¢`
}

/** A share 0..1 as a whole percentage ("83 %"); null or non-number gives "—". */
export function formatShare(share: number | null | undefined): string {
  if (share == null || !Number.isFinite(share)) return '—'
  return `${Math.round(Math.min(1, Math.max(0, share)) * 100)} %`
}

/** The word a screen reader hears beside the number. */
export function directionWord(direction: Direction): string {
  switch (direction) {
    case 'flat': return 'flat'
    case 'sharp': return 'sharp'
    case 'in-tune': return 'in tune'
    default: return 'no pitch found'
  }
}

/** Fill colour of a signed deviation, for charts. */
export function deviationFill(cents: number | null | undefined, tolerance: number): string {
  return SWATCHES[classifyDeviation(cents, tolerance).token].fill
}

/** Tailwind classes for a badge or cell of the given token (fill plus readable text). */
export function tokenClasses(token: DeviationToken): string {
  return TOKEN_CLASSES[token]
}

// Written out in full so Tailwind's scanner and the safelist find them.
const TOKEN_CLASSES: Record<DeviationToken, string> = {
  'flat-3': 'bg-flat-3 text-white',
  'flat-2': 'bg-flat-2 text-ink',
  'flat-1': 'bg-flat-1 text-ink',
  'in-tune': 'bg-in-tune text-ink',
  'sharp-1': 'bg-sharp-1 text-ink',
  'sharp-2': 'bg-sharp-2 text-ink',
  'sharp-3': 'bg-sharp-3 text-white',
  'off-1': 'bg-off-1 text-ink',
  'off-2': 'bg-off-2 text-ink',
  'off-3': 'bg-off-3 text-white',
  'none': 'bg-no-pitch text-muted',
}

export interface LegendEntry {
  token: SignedToken
  direction: Direction
  /** Human range such as "−20.0 to −10.1 ¢", "±10.0 ¢", "more than +40.0 ¢". */
  range: string
}

function fmt(n: number): string {
  return Math.abs(n).toFixed(1)
}

/** The seven steps of the signed scale, flat to sharp, with their ranges for a legend. */
export function deviationScale(tolerance: number): LegendEntry[] {
  const t = safeTolerance(tolerance)
  const [a, b] = [t * STEP_FACTORS[0], t * STEP_FACTORS[1]]
  return [
    { token: 'flat-3', direction: 'flat', range: `more than ${MINUS}${fmt(b)} ¢` },
    { token: 'flat-2', direction: 'flat', range: `${MINUS}${fmt(b)} to ${MINUS}${fmt(a)} ¢` },
    { token: 'flat-1', direction: 'flat', range: `${MINUS}${fmt(a)} to ${MINUS}${fmt(t)} ¢` },
    { token: 'in-tune', direction: 'in-tune', range: `±${fmt(t)} ¢` },
    { token: 'sharp-1', direction: 'sharp', range: `+${fmt(t)} to +${fmt(a)} ¢` },
    { token: 'sharp-2', direction: 'sharp', range: `+${fmt(a)} to +${fmt(b)} ¢` },
    { token: 'sharp-3', direction: 'sharp', range: `more than +${fmt(b)} ¢` },
  ]
}

function channel(v: number): number {
  const s = v / 255
  return s <= 0.03928 ? s / 12.92 : ((s + 0.055) / 1.055) ** 2.4
}

/** WCAG 2 relative luminance of a "#rrggbb" colour. */
export function relativeLuminance(hex: string): number {
  const m = /^#?([0-9a-f]{2})([0-9a-f]{2})([0-9a-f]{2})$/i.exec(hex)
  if (!m) throw new Error(`not a #rrggbb colour: ${hex}`)
  const [r, g, b] = [m[1]!, m[2]!, m[3]!].map(h => channel(parseInt(h, 16)))
  return 0.2126 * r! + 0.7152 * g! + 0.0722 * b!
}

/** WCAG 2 contrast ratio of two colours, 1..21. */
export function contrastRatio(a: string, b: string): number {
  const [la, lb] = [relativeLuminance(a), relativeLuminance(b)]
  return (Math.max(la, lb) + 0.05) / (Math.min(la, lb) + 0.05)
}
