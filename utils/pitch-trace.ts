// The points of a take's pitch trace, in cents from each hold's target. Kept apart from the chart
// component so the rules (no invented pitch, wrong notes never drawn as a deviation) are testable
// without a canvas.
import { formatCents } from '../shared/deviation'
import { holdKind, wrongNote, wrongNoteText, type WordedHold } from '../shared/report-wording'

export interface TraceHold extends WordedHold {
  index: number
  startS: number
  endS: number
  targetHz: number | null
  trace?: [number, number][] | null
}

export type TracePoint = { x: number, y: number | null }
/** A wrong note is marked at the chart's edge on the side it was heard, with its words for the tooltip. */
export type WrongNoteMarker = { x: number, y: number, text: string, side: 'above' | 'below' }

/** The measured holds' pitch in cents from target; a null point ends each hold so breaths are not joined. */
export function traceSeries(holds: TraceHold[]): TracePoint[] {
  const out: TracePoint[] = []
  for (const h of [...holds].sort((a, b) => a.startS - b.startS)) {
    if (holdKind(h) !== 'measured' || h.detectedHz == null || !h.targetHz) continue
    const trace = (h.trace ?? []).filter(([t, hz]) => Number.isFinite(t) && Number.isFinite(hz) && hz > 0)
    if (trace.length) {
      for (const [t, hz] of trace) out.push({ x: t, y: 1200 * Math.log2(hz / h.targetHz) })
    }
    else if (h.centsFromTarget != null && Number.isFinite(h.centsFromTarget)) {
      out.push({ x: h.startS, y: h.centsFromTarget }, { x: h.endS, y: h.centsFromTarget })
    }
    out.push({ x: h.endS, y: null })
  }
  return out
}

/** One marker per wrong note, at the top (heard above) or bottom (heard below) of a ±`limit` cents chart. */
export function wrongNoteMarkers(holds: TraceHold[], limit: number, note?: (name: string) => string): WrongNoteMarker[] {
  const out: WrongNoteMarker[] = []
  for (const h of holds) {
    const text = wrongNoteText(h, note)
    if (!text) continue
    const side = (wrongNote(h)?.cents ?? 0) < 0 ? 'below' : 'above'
    const x = Number.isFinite(h.startS) && Number.isFinite(h.endS) ? (h.startS + h.endS) / 2 : 0
    out.push({ x, y: side === 'above' ? limit : -limit, text: `Hold ${h.index + 1}: ${text}`, side })
  }
  return out.sort((a, b) => a.x - b.x)
}

/** The tooltip line of a point: a wrong note's words, or the deviation and time of a pitch point. */
export function traceTooltip(point: { x: number, y: number | null, text?: string }): string {
  if (point.text) return point.text
  return `${formatCents(point.y)} at ${Number(point.x).toFixed(2)} s`
}
