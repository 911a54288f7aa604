// How a take report's hold figures read in the hold table and on the phone cards.
import { formatCents, formatNumber } from '#shared/deviation'
import type { ReportHold } from '#shared/types/take'

/** "329.63 Hz", or a dash. */
export function holdHz(v: number | null | undefined): string {
  return formatNumber(v, 2, 'Hz')
}

/** Minutes and tenths of seconds into the take ("1:04.2"), or a dash. */
export function holdTime(s: number | null | undefined): string {
  if (s == null || !Number.isFinite(s)) return '—'
  const m = Math.floor(s / 60)
  return `${m}:${(s - m * 60).toFixed(1).padStart(4, '0')}`
}

/** Signed cents per second ("−0.8 ¢/s"), or a dash. */
export function holdSlope(v: number | null | undefined): string {
  return v == null || !Number.isFinite(v) ? '—' : `${formatCents(v).replace(' ¢', '')} ¢/s`
}

/** A confidence of 0–1 as a whole percentage, or a dash. */
export function holdConfidence(v: number | null | undefined): string {
  return v == null || !Number.isFinite(v) ? '—' : `${Math.round(Math.min(1, Math.max(0, v)) * 100)} %`
}

/** The note as written for the part (transposing instruments), else the concert note. */
export function writtenNoteOf(h: Pick<ReportHold, 'writtenNote' | 'note'>): string {
  return h.writtenNote || h.note || '—'
}
