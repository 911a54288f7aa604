// The review API's shapes, once (server, pages and tests import them).
import type { ReviewVerdict } from '../schemas/review'
import type { TakeStatusName } from './take'

export type { ReviewVerdict }

/** A note of a review as GET /api/takes/:id sends it. */
export interface ReviewNote {
  id: number
  /** Seconds from the start of the take; null for a note on the whole take. */
  atS: number | null
  /** Position in the report's hold list of the hold under `atS`; null between holds or for the whole take. */
  holdIndex: number | null
  body: string
}

/** One reviewer's review of a take (GET /api/takes/:id → `reviews`). */
export interface TakeReview {
  id: number
  reviewer: { id: number, name: string }
  verdict: ReviewVerdict
  summary: string | null
  notes: ReviewNote[]
  /** When it was last saved. */
  at: string
  /** The caller wrote it (and may change it). */
  mine: boolean
}

/** POST /api/takes/:id/reviews: 201 for a new review, 200 when the reviewer's review was updated. */
export interface ReviewSaved { id: number, created: boolean }

/** A row of GET /api/reviews/queue. */
export interface ReviewQueueItem {
  takeId: number
  ensemble: { id: number, name: string }
  player: { id: number, name: string }
  section: { id: number, name: string } | null
  drill: { id: number, title: string }
  assignment: { id: number, title: string | null } | null
  part: string
  status: TakeStatusName
  submittedAt: string
  meanAbsCents: number | null
  /** ± cents the take was scored at. */
  tolerance: number
}

/** What the queue can be filtered by (every value that occurs in the caller's queue). */
export interface ReviewQueueFacets {
  sections: Array<{ id: number, name: string, ensembleName: string }>
  drills: Array<{ id: number, title: string }>
  assignments: Array<{ id: number, title: string }>
  players: Array<{ id: number, name: string }>
}

/** GET /api/reviews/queue */
export interface ReviewQueuePage {
  items: ReviewQueueItem[]
  total: number
  page: number
  pageSize: number
  facets: ReviewQueueFacets
}

/** The latest verdict on a take, for lists (take list, home). */
export interface ReviewMark { reviewer: string, verdict: ReviewVerdict, at: string }
