// The assignment API's response shapes, once: routes, seed and pages import them.
import type { AssignmentStatus } from '../assignments/status'

/** POST /api/ensembles/:id/assignments → 201 */
export interface AssignmentCreated {
  id: number
  /** People the assignment reaches. */
  assignees: number
}

/** One entry of GET /api/assignments (the caller's own, as a player). */
export interface MyAssignment {
  id: number
  drillId: number
  /** The drill's title. */
  drill: string
  /** The part to record (null when neither the director nor the section names one). */
  part: string | null
  dueAt: string | null
  status: AssignmentStatus
  latestTakeId: number | null
  ensembleId: number
  ensembleName: string
  title: string | null
  instructions: string
  /** Takes allowed (null = no limit) and sent so far. */
  attempts: number | null
  attemptsUsed: number
}

/** What the director chose: a section, or a player, with the part they record (null = the default). */
export interface AssignmentTarget {
  sectionId: number | null
  sectionName: string | null
  userId: number | null
  userName: string | null
  part: string | null
}

/** One entry of GET /api/ensembles/:id/assignments. */
export interface AssignmentSummary {
  id: number
  drillId: number
  drill: string
  title: string | null
  instructions: string
  dueAt: string | null
  attempts: number | null
  archived: boolean
  createdAt: string
  targets: AssignmentTarget[]
  assignees: number
  submitted: number
}

export interface AssignmentList {
  items: AssignmentSummary[]
  total: number
  page: number
  pageSize: number
}

/** One player of GET /api/ensembles/:id/assignments/:assignmentId/progress. */
export interface AssignmentProgressPlayer {
  userId: number
  name: string
  section: string | null
  part: string | null
  submitted: boolean
  latestTakeId: number | null
  /** Mean absolute deviation of the latest take's current analysis; null until analysed. */
  meanAbsCents: number | null
  /** Takes sent for the assignment (withdrawn ones included: they used an attempt). */
  takes: number
  status: AssignmentStatus
}

export interface AssignmentProgress {
  assignment: AssignmentSummary
  /** ± cents the drill grades at (for the deviation colours). */
  tolerance: number
  players: AssignmentProgressPlayer[]
}
