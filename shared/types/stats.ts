// The ensemble statistics contract (GET /api/ensembles/:id/stats) and the hold rows it is
// computed from. The server, the charts page and the tests import these shapes.

/** Distribution of cents from target for one chord member (quartiles: Hyndman & Fan type 7). */
export interface MemberStats {
  member: string
  n: number
  meanCents: number
  medianCents: number
  q1: number
  q3: number
  min: number
  max: number
}

export interface PlayerStats {
  userId: number
  name: string
  section: string | null
  takes: number
  holds: number
  /** Null when none of the player's holds could be scored. */
  meanAbsCents: number | null
  meanCents: number | null
  /** Share (0–1) of the player's scored holds within ± tolerance. */
  withinShare: number | null
}

export interface WeekStats {
  /** Monday of the ISO week (UTC), as YYYY-MM-DD. */
  weekStart: string
  takes: number
  meanAbsCents: number | null
  meanCents: number | null
}

/** One hold of a drill (chord × part), pooled over every take of it that matched the filters. */
export interface WorstHold {
  drillId: number
  chordIndex: number
  part: string
  member: string | null
  /** The sections of the players whose takes sang or played this hold, by name. */
  sections: string[]
  n: number
  /** Share (0–1) of the takes' measurements of this hold outside ± tolerance. */
  outShare: number
  meanCents: number
}

export interface EnsembleStats {
  takes: number
  holds: number
  members: MemberStats[]
  players: PlayerStats[]
  weeks: WeekStats[]
  worstHolds: WorstHold[]
}

/** One analysed, not withdrawn take that matched the filters. */
export interface StatTakeRow {
  takeId: number
  submittedAt: string
  userId: number
  player: string
  section: string | null
  drillId: number
  part: string
  /** The take's drift re-fitted under the scoring asked for (re-scored rows only; cents per minute). */
  driftCentsPerMin?: number | null
}

/** One scored hold (found, not a wrong note) of one take, with what the figures group by. */
export interface StatHoldRow extends StatTakeRow {
  chordIndex: number
  member: string | null
  centsFromTarget: number
  withinTolerance: boolean
}
