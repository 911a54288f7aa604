import { describe, expect, it } from 'vitest'
import {
  DIRECTION_INK, MINUS, SURFACES, SWATCHES, classifyDeviation, classifyMagnitude, contrastRatio,
  deviationFill, deviationScale, directionWord, formatAbsCents, formatCents, formatShare, relativeLuminance, tokenClasses,
} from '../../../shared/deviation'

describe('formatCents', () => {
  // U+2212 MINUS SIGN is the typographic minus (Unicode Standard, Mathematical Operators block).
  it('uses the true minus sign, not a hyphen', () => {
    expect(MINUS).toBe('\u2212')
    expect(formatCents(-6.2)).toBe('\u22126.2 ¢')
    expect(formatCents(-6.2)).not.toContain('-')
  })

  it.each([
    [-6.2, '−6.2 ¢'],
    [3, '+3.0 ¢'],
    [0, '0.0 ¢'],
    [-0.04, '0.0 ¢'], // rounds to zero: no "−0.0 ¢"
    [0.05, '+0.1 ¢'],
    [13.686, '+13.7 ¢'],
    [-1200, '−1200.0 ¢'],
  ])('%s → %s', (cents, text) => {
    expect(formatCents(cents)).toBe(text)
  })

  it('says "no pitch found" rather than a number for null or NaN', () => {
    expect(formatCents(null)).toBe('no pitch found')
    expect(formatCents(Number.NaN)).toBe('no pitch found')
    expect(formatCents(Infinity)).toBe('no pitch found')
  })

  it('honours the number of digits', () => {
    expect(formatCents(-2.345, 2)).toBe('−2.35 ¢')
    expect(formatCents(4.4, 0)).toBe('+4 ¢')
  })
})

describe('formatAbsCents and formatShare', () => {
  it.each([[6.24, '6.2 ¢'], [-6.24, '6.2 ¢'], [0, '0.0 ¢']])('%s → %s', (c, t) => {
    expect(formatAbsCents(c)).toBe(t)
  })
  it.each([[0.834, '83 %'], [1, '100 %'], [0, '0 %'], [1.2, '100 %'], [null, '—']])('%s → %s', (s, t) => {
    expect(formatShare(s)).toBe(t)
  })
})

describe('classifyDeviation (tolerance ±10 ¢; steps at 2× and 4× the tolerance)', () => {
  it.each([
    [0, 'in-tune', 0, 'in-tune'],
    [10, 'in-tune', 0, 'in-tune'], // the boundary is inside: "within ± tolerance"
    [-10, 'in-tune', 0, 'in-tune'],
    [10.04, 'in-tune', 0, 'in-tune'], // shown as +10.0 ¢, so coloured as in tune
    [10.1, 'sharp', 1, 'sharp-1'],
    [20, 'sharp', 1, 'sharp-1'],
    [20.1, 'sharp', 2, 'sharp-2'],
    [40, 'sharp', 2, 'sharp-2'],
    [41, 'sharp', 3, 'sharp-3'],
    [-10.1, 'flat', 1, 'flat-1'],
    [-25, 'flat', 2, 'flat-2'],
    [-100, 'flat', 3, 'flat-3'],
  ])('%s ¢ → %s step %s', (cents, direction, step, token) => {
    expect(classifyDeviation(cents, 10)).toEqual({ direction, step, token })
  })

  it('gives "none" for no pitch and never throws on bad numbers', () => {
    expect(classifyDeviation(null, 10).token).toBe('none')
    expect(classifyDeviation(Number.NaN, 10).token).toBe('none')
    // A broken tolerance counts as zero: anything audible is outside it.
    expect(classifyDeviation(0.5, Number.NaN).token).toBe('sharp-3')
    expect(classifyDeviation(0, -5).token).toBe('in-tune')
  })

  it('scales with the tolerance', () => {
    expect(classifyDeviation(-7, 3).token).toBe('flat-2')
    expect(classifyDeviation(-7, 15).token).toBe('in-tune')
  })
})

describe('classifyMagnitude (mean absolute deviation has no direction)', () => {
  it.each([
    [4, 'in-tune'], [10, 'in-tune'], [12, 'off-1'], [30, 'off-2'], [50, 'off-3'], [null, 'none'],
  ])('%s ¢ → %s', (cents, token) => {
    expect(classifyMagnitude(cents, 10).token).toBe(token)
  })
})

describe('words and classes', () => {
  it.each([['flat', 'flat'], ['sharp', 'sharp'], ['in-tune', 'in tune'], ['none', 'no pitch found']] as const)('%s → %s', (d, w) => {
    expect(directionWord(d)).toBe(w)
  })
  it('names the Tailwind token classes', () => {
    expect(tokenClasses('flat-3')).toBe('bg-flat-3 text-white')
    expect(tokenClasses('sharp-1')).toBe('bg-sharp-1 text-ink')
    expect(tokenClasses('in-tune')).toBe('bg-in-tune text-ink')
  })
  it('fills charts with the swatch colour', () => {
    expect(deviationFill(-30, 10)).toBe(SWATCHES['flat-2'].fill)
    expect(deviationFill(null, 10)).toBe(SWATCHES.none.fill)
  })
})

describe('the scale itself', () => {
  it('is cool (blue) on the flat side and warm (amber) on the sharp side', () => {
    // Hue check: blue fills have more blue than red, amber fills more red than blue.
    const rgb = (hex: string) => [1, 3, 5].map(i => parseInt(hex.slice(i, i + 2), 16)) as [number, number, number]
    for (const t of ['flat-1', 'flat-2', 'flat-3'] as const) {
      const [r, , b] = rgb(SWATCHES[t].fill)
      expect(b).toBeGreaterThan(r)
    }
    for (const t of ['sharp-1', 'sharp-2', 'sharp-3'] as const) {
      const [r, , b] = rgb(SWATCHES[t].fill)
      expect(r).toBeGreaterThan(b)
    }
  })

  it('grows darker with each step away from in tune', () => {
    for (const side of ['flat', 'sharp'] as const) {
      const l = [1, 2, 3].map(s => relativeLuminance(SWATCHES[`${side}-${s}` as 'flat-1'].fill))
      expect(l[0]).toBeGreaterThan(l[1]!)
      expect(l[1]).toBeGreaterThan(l[2]!)
    }
  })

  it('lists seven legend steps from flat to sharp with their ranges', () => {
    const s = deviationScale(5)
    expect(s.map(e => e.token)).toEqual(['flat-3', 'flat-2', 'flat-1', 'in-tune', 'sharp-1', 'sharp-2', 'sharp-3'])
    expect(s[3]!.range).toBe('±5.0 ¢')
    expect(s[1]!.range).toBe('−20.0 to −10.0 ¢')
    expect(s[6]!.range).toBe('more than +20.0 ¢')
  })
})

describe('contrast (WCAG 2.x relative luminance and contrast ratio)', () => {
  // Reference values of the WCAG 2 formula: black on white is 21:1 and equal colours 1:1 (the
  // definition's bounds); #767676 on white is about 4.54:1 (from memory; the usual "lightest AA
  // grey on white" example), while #777777 falls just short of 4.5.
  it.each([
    ['#000000', '#ffffff', 21],
    ['#ffffff', '#ffffff', 1],
    ['#767676', '#ffffff', 4.54],
  ])('%s on %s ≈ %s', (a, b, ratio) => {
    expect(contrastRatio(a, b)).toBeCloseTo(ratio, 2)
  })
  it('#777777 on white is below AA', () => {
    expect(contrastRatio('#777777', '#ffffff')).toBeLessThan(4.5)
  })

  it('every swatch carries AA text (4.5:1) on its fill', () => {
    for (const [token, s] of Object.entries(SWATCHES)) {
      expect(contrastRatio(s.fill, s.onFill), token).toBeGreaterThanOrEqual(4.5)
    }
  })

  it('direction inks, body and muted text are AA on every surface', () => {
    for (const bg of [SURFACES.paper, SURFACES.raised, SURFACES.sunk]) {
      for (const [d, ink] of Object.entries(DIRECTION_INK)) {
        expect(contrastRatio(ink, bg), `${d} on ${bg}`).toBeGreaterThanOrEqual(4.5)
      }
      expect(contrastRatio(SURFACES.ink, bg)).toBeGreaterThanOrEqual(7)
      expect(contrastRatio(SURFACES.muted, bg)).toBeGreaterThanOrEqual(4.5)
      expect(contrastRatio(SURFACES.accent, bg)).toBeGreaterThanOrEqual(4.5)
    }
  })

  it('control borders reach 3:1 on every surface (WCAG 2.1 SC 1.4.11 non-text contrast)', () => {
    for (const bg of [SURFACES.paper, SURFACES.raised, SURFACES.sunk]) {
      expect(contrastRatio(SURFACES.control, bg), bg).toBeGreaterThanOrEqual(3)
    }
  })

  it('rejects colours it cannot read', () => {
    expect(() => relativeLuminance('blue')).toThrow()
  })
})
