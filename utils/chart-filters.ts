// The charts screen's filters: read from the address (so a view can be bookmarked, shared and
// printed), turned into the stats/charts query, and checked with the routes' own schema.
import { StatsQuery } from '#shared/schemas/stats'
import { parseScala } from '#shared/tuning/scala'
import type { EnsembleRole } from '#shared/types/user'

export type ChartView = 'player' | 'section' | 'ensemble'

/** Filter fields the address carries besides the ensemble and the view. */
export const FILTER_KEYS = ['sectionId', 'userId', 'drillId', 'assignmentId', 'from', 'to', 'system', 'seventh', 'tonic', 'start', 'wolf', 'fraction', 'scala', 'a4', 'tolerance'] as const
export type FilterKey = typeof FILTER_KEYS[number]
export type ChartFilters = Partial<Record<FilterKey, string>>

/** The views a role may open, widest first. */
export function viewsFor(role: EnsembleRole | null | undefined): ChartView[] {
  if (role === 'director' || role == null) return ['ensemble', 'section', 'player']
  if (role === 'section_leader') return ['section', 'player']
  return ['player']
}

export const VIEW_LABELS: Record<ChartView, string> = { ensemble: 'Ensemble', section: 'Section', player: 'Player' }

/** String filters from a route query (arrays and empty values dropped). */
export function filtersFromQuery(q: Record<string, unknown>): ChartFilters {
  const out: ChartFilters = {}
  for (const k of FILTER_KEYS) {
    const v = q[k]
    if (typeof v === 'string' && v.trim() !== '') out[k] = v.trim()
  }
  return out
}

/**
 * The query for /stats, /charts and holds.csv of a view: the player view is one player's, the
 * section view one section's, the ensemble view everyone's (the scope keys of other views dropped).
 */
export function apiQuery(view: ChartView, f: ChartFilters, defaults: { userId?: number | null, sectionId?: number | null }): Record<string, string> {
  const q: Record<string, string> = {}
  for (const k of FILTER_KEYS) if (f[k] && k !== 'sectionId' && k !== 'userId') q[k] = f[k]!
  if (view === 'player') {
    const u = f.userId ?? (defaults.userId != null ? String(defaults.userId) : undefined)
    if (u) q.userId = u
  } else if (view === 'section') {
    const s = f.sectionId ?? (defaults.sectionId != null ? String(defaults.sectionId) : undefined)
    if (s) q.sectionId = s
  }
  // Options of a tuning system mean nothing without the system.
  if (!q.system) for (const k of ['seventh', 'tonic', 'start', 'wolf', 'fraction', 'scala'] as const) delete q[k]
  return q
}

/** Field → message for a query the routes would refuse (checked with their own schema), or null. */
export function filterErrors(q: Record<string, string>): Record<string, string> | null {
  const r = StatsQuery.safeParse(q)
  if (r.success) return null
  const out: Record<string, string> = {}
  for (const issue of r.error.issues) {
    const key = String(issue.path[0] ?? 'form')
    if (!out[key]) out[key] = plainFilterMessage(key, issue.message)
  }
  return out
}

const FIELD_WORDS: Record<string, string> = { from: 'From', to: 'To', a4: 'A4', tolerance: 'Tolerance', tonic: 'Tonic', start: 'Start note', wolf: 'Wolf', fraction: 'Comma fraction', scala: 'Scala file' }
function plainFilterMessage(key: string, message: string): string {
  if (key === 'a4') return 'A4 must be a number from 415 to 466 Hz.'
  if (key === 'tolerance') return 'Tolerance must be a number from 0.01 to 50 cents.'
  if (key === 'from' || key === 'to') return message.includes('before') ? '“To” must not be before “From”.' : `${FIELD_WORDS[key]} must be a date such as 2026-03-01.`
  return `${FIELD_WORDS[key] ?? key}: ${message}`
}

/** "name: description (N pitches)" of a Scala filter's text, or null when it does not parse. */
export function scalaSummary(text: string | undefined): string | null {
  if (!text) return null
  try {
    const scale = parseScala(text)
    return `${scale.description || 'a Scala scale'} (${scale.degrees.length} pitches)`
  }
  catch { return null }
}

/** A query string with the keys in a stable order. */
export function queryString(q: Record<string, string>): string {
  return new URLSearchParams(Object.keys(q).sort().map(k => [k, q[k]!])).toString()
}
