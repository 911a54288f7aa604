// GET /api/home, once for the server and the home page.
import type { EnsembleRole, SessionUser } from './user'
import type { TakeStatusName } from './take'
import type { ReviewMark } from './review'

export interface HomeMembership {
  ensembleId: number
  ensembleName: string
  role: EnsembleRole
  sectionId: number | null
  sectionName: string | null
}

/** An open assignment of the caller's. */
export interface HomeDue {
  assignmentId: number
  ensembleId: number
  ensembleName: string
  drillId: number
  drillTitle: string
  /** The assignment's own title, when the director gave one. */
  title: string | null
  /** The part to record (null when the drill has no part for the caller's section). */
  part: string | null
  dueAt: string | null
  submitted: boolean
  overdue: boolean
  /** ± cents the drill grades at. */
  tolerance: number
}

/** A take waiting for the caller's review. */
export interface HomeReview {
  takeId: number
  ensembleName: string
  playerName: string
  sectionName: string | null
  drillTitle: string
  part: string
  status: TakeStatusName
  submittedAt: string
  meanAbsCents: number | null
  /** ± cents the take was scored at (its analysis, else its drill). */
  tolerance: number
}

/** One of the caller's own recent takes. */
export interface HomeRecent {
  takeId: number
  drillTitle: string
  part: string
  status: TakeStatusName
  createdAt: string
  meanAbsCents: number | null
  withinToleranceShare: number | null
  /** Drift over the take, cents per minute; null until analysed, or when too few holds give a slope. */
  driftCentsPerMin: number | null
  /** ± cents the take was scored at (its analysis, else its drill). */
  tolerance: number
  /** The latest review's verdict and reviewer; null until reviewed. */
  review: ReviewMark | null
}

/** A director's ensemble over the last `periodDays`. */
export interface HomeEnsembleSummary {
  ensembleId: number
  ensembleName: string
  takesAnalysed: number
  meanAbsCents: number | null
  withinToleranceShare: number | null
  periodDays: number
  /** ± cents of the ensemble's drills (their mean, when they differ); null without drills. */
  tolerance: number | null
}

/** GET /api/home */
export interface HomeData {
  user: SessionUser
  memberships: HomeMembership[]
  due: HomeDue[]
  toReview: HomeReview[]
  recent: HomeRecent[]
  ensembleSummary: HomeEnsembleSummary[]
}
