// Requests of the review screens besides fetching: saving a review, the queue's query.
import type { ReviewBody } from '#shared/schemas/review'
import type { ReviewSaved } from '#shared/types/review'

/** Saves the caller's review of a take (a new one, or theirs replaced). */
export function requestReview(takeId: number, body: ReviewBody): Promise<ReviewSaved> {
  return $fetch<ReviewSaved>(`/api/takes/${takeId}/reviews`, { method: 'POST', body })
}

/** Filters of the review queue as the page keeps them in the address. */
export interface ReviewQueueFilters {
  sectionId?: string
  drillId?: string
  assignmentId?: string
  playerId?: string
  page?: number
}

export const REVIEW_PAGE_SIZE = 20

/** The query GET /api/reviews/queue receives: empty filters left out, only plain ids kept. */
export function reviewQueueQuery(f: ReviewQueueFilters): Record<string, string> {
  const q: Record<string, string> = { page: String(Math.max(1, Math.floor(Number(f.page) || 1))), pageSize: String(REVIEW_PAGE_SIZE) }
  for (const k of ['sectionId', 'drillId', 'assignmentId', 'playerId'] as const) {
    const v = f[k]
    if (v && /^[1-9]\d{0,15}$/.test(v)) q[k] = v
  }
  return q
}
