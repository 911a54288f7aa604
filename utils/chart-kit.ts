// Shared pieces of the charts screens: chart.js registration, the look every chart shares, the
// chord-member series styles, and small formatting helpers for the tables beside the charts.
import {
  BarElement, CategoryScale, Chart as ChartJS, Filler, Legend, LinearScale, LineElement, PointElement, Tooltip,
} from 'chart.js'
import { SURFACES, SWATCHES, formatNumber } from '#shared/deviation'

let registered = false
/** Registers the chart.js parts the charts use (once). */
export function registerCharts(): void {
  if (registered) return
  ChartJS.register(BarElement, CategoryScale, LinearScale, LineElement, PointElement, Filler, Tooltip, Legend)
  ChartJS.defaults.font.family = 'Lato, ui-sans-serif, system-ui, sans-serif'
  ChartJS.defaults.color = SURFACES.muted
  registered = true
}

/** Series styles for chord members: colour AND point shape differ, so colour is never the only cue. */
export const MEMBER_STYLES: Record<string, { color: string, point: 'circle' | 'triangle' | 'rect' | 'rectRot' | 'star' | 'crossRot' }> = {
  root: { color: SURFACES.ink, point: 'circle' },
  third: { color: SWATCHES['sharp-3'].fill, point: 'triangle' },
  fifth: { color: SWATCHES['flat-3'].fill, point: 'rect' },
  seventh: { color: '#6b4c8a', point: 'rectRot' },
}
export function memberStyle(member: string) {
  return MEMBER_STYLES[member] ?? { color: SURFACES.muted, point: 'crossRot' as const }
}

const ORDER = ['root', 'third', 'fifth', 'seventh', 'ninth', 'eleventh', 'thirteenth']
/** Chord members in the chord's own order, then the rest by name. */
export function sortMembers(members: Iterable<string>): string[] {
  const rank = (m: string) => { const i = ORDER.indexOf(m); return i < 0 ? ORDER.length : i }
  return [...new Set(members)].sort((a, b) => rank(a) - rank(b) || a.localeCompare(b))
}

/** "3 Mar 2026" in UTC (take times and ISO weeks are UTC). */
export function chartDate(iso: string): string {
  const d = new Date(iso.length === 10 ? `${iso}T00:00:00Z` : iso)
  if (!Number.isFinite(d.getTime())) return '—'
  return d.toLocaleDateString('en-GB', { day: 'numeric', month: 'short', year: 'numeric', timeZone: 'UTC' })
}

/** A drift in cents per minute, signed: "−1.3 ¢/min"; null → "not enough holds". */
export function formatDrift(v: number | null | undefined): string {
  return formatNumber(v, 1, '¢/min', { signed: true, missing: 'not enough holds' })
}

/** "Chord 3" (chord numbers start at 1, as on the take report). */
export function chordLabel(chordIndex: number): string {
  return `Chord ${chordIndex + 1}`
}

/** Longest line of a chart's category label before it is cut short with "…" (the table beside the chart has it whole). */
export const LABEL_LINE_MAX = 30

/** `text` cut to `max` characters, the last one "…" when it was longer. */
export function shortLine(text: string, max = LABEL_LINE_MAX): string {
  const chars = [...text.trim()]
  return chars.length <= max ? chars.join('') : `${chars.slice(0, max - 1).join('').trimEnd()}…`
}

/**
 * A worst hold's category label as lines (Chart.js draws an array as one line each), short
 * enough for a phone: the drill; the chord, part and member; the sections and how many times.
 */
export function worstHoldLabel(h: { chordIndex: number, part: string, member: string | null, sections: string[], n: number }, drillTitle: string): string[] {
  return [
    shortLine(drillTitle),
    shortLine(`${chordLabel(h.chordIndex)} · ${h.part}${h.member ? ` (${h.member})` : ''}`),
    shortLine(`${h.sections.length ? `${h.sections.join(', ')} · ` : ''}${h.n}×`),
  ]
}

/** Axis options for cents with a signed tick label. */
export function centsAxis(title: string) {
  return {
    title: { display: true, text: title },
    grid: { color: SURFACES.rule },
    ticks: { callback: (v: string | number) => formatNumber(Number(v), 0, '¢', { signed: true }) },
  }
}
