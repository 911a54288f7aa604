// The chart series (GET /api/ensembles/:id/charts): what the charts need beyond the ensemble
// statistics — per-take series, the hold × player grid, sections side by side, participation per
// assignment. Same filters and access as /stats. And what the caller may choose from on the
// charts screen (GET /api/ensembles/:id/charts/choices).
import type { EnsembleRole } from './user'

/** One take's figures over its scored holds (found, not wrong notes). */
export interface ChartTake {
  takeId: number
  submittedAt: string
  userId: number
  player: string
  section: string | null
  drillId: number
  part: string
  holds: number
  meanCents: number | null
  meanAbsCents: number | null
  withinShare: number | null
  /** Drift over the take in cents per minute: as analysed, or re-fitted under the scoring asked for (null: not enough holds to tell). */
  driftCentsPerMin: number | null
  /** Mean cents from target per chord member in this take. */
  members: Record<string, number>
}

/** One hold (chord × part of a drill) for one player: their mean cents from target over their takes. */
export interface GridCell {
  drillId: number
  chordIndex: number
  part: string
  member: string | null
  userId: number
  n: number
  meanCents: number
}

export interface SectionFigures {
  sectionId: number | null
  section: string | null
  players: number
  takes: number
  holds: number
  meanCents: number | null
  meanAbsCents: number | null
  withinShare: number | null
}

export interface Participation {
  assignmentId: number
  title: string
  drillId: number
  sectionId: number | null
  dueAt: string | null
  /** Members the assignment asks (within what the caller may see). */
  expected: number
  /** Of them, those with at least one take (not withdrawn). */
  submitted: number
  missing: Array<{ userId: number, name: string, section: string | null }>
}

export interface ChartChoices {
  role: EnsembleRole
  userId: number
  /** The caller's own section (section leaders, players). */
  sectionId: number | null
  /** The ensemble's tolerance, the default colour scale. */
  tolerance: number
  drills: Array<{ id: number, title: string }>
  assignments: Array<{ id: number, title: string, drillId: number }>
  /** Sections the caller may chart. */
  sections: Array<{ id: number, name: string }>
  /** Players the caller may chart one by one. */
  players: Array<{ userId: number, name: string, sectionId: number | null }>
}

/** The drift within takes, by the ISO week (UTC) they were sent: the mean of the takes' drifts. */
export interface WeekDrift {
  /** Monday of the week, YYYY-MM-DD. */
  weekStart: string
  /** Takes of the week whose drift could be told (three or more holds measured). */
  takes: number
  /** Mean of those takes' drift, cents per minute. */
  driftCentsPerMin: number
}

export interface ChartSeries {
  takes: ChartTake[]
  /** Drift by week over every take in scope. */
  weeks: WeekDrift[]
  /** Only when the figures are limited to a section, a player or a drill (else empty). */
  grid: GridCell[]
  sections: SectionFigures[]
  participation: Participation[]
  /** Takes whose drill changed since, so they could not be re-scored. */
  notRescored: number
}
