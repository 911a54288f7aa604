// Review helpers both sides use: which hold a pinned moment falls in, and the verdicts in words.
import type { ReviewVerdict } from './schemas/review'

/** The part of a report hold that places it in the take. */
export interface HoldSpan { startS: number, endS: number }

/**
 * The position (in the report's hold list) of the hold sounding at `atS` seconds, or null when the
 * moment falls between holds or outside them. A hold covers [startS, endS); where two holds touch,
 * the moment belongs to the later one, the one that has begun.
 */
export function holdIndexAt(holds: readonly HoldSpan[] | null | undefined, atS: number | null | undefined): number | null {
  if (atS == null || !Number.isFinite(atS) || !holds) return null
  let found: number | null = null
  for (const [i, h] of holds.entries()) {
    if (!Number.isFinite(h.startS) || !Number.isFinite(h.endS) || h.endS <= h.startS) continue
    if (atS >= h.startS && atS < h.endS) found = i
  }
  return found
}

/** The middle of a hold: where a note pinned "to the hold" is placed. */
export function holdMidpoint(h: HoldSpan): number {
  return Math.round(((h.startS + h.endS) / 2) * 1000) / 1000
}

export const VERDICT_LABELS: Record<ReviewVerdict, string> = {
  approved: 'Approved',
  needs_work: 'Needs work',
  retake: 'Record again',
}

/** "1:05.3" for 65.3 seconds (a moment in a take). */
export function formatMoment(s: number): string {
  const whole = Math.max(0, s)
  const m = Math.floor(whole / 60)
  return `${m}:${(whole - m * 60).toFixed(1).padStart(4, '0')}`
}
