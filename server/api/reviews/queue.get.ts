import type { ReviewQueuePage } from '../../../shared/types/review'
import { ReviewQueueQuery } from '../../../shared/schemas/review'

// GET /api/reviews/queue?ensembleId=&sectionId=&drillId=&assignmentId=&playerId=&page=&pageSize=
// → { items, total, page, pageSize, facets }: takes nobody has reviewed yet, oldest first.
export default defineEventHandler(async (event): Promise<ReviewQueuePage> => {
  const user = await requireUser(event)
  const q = validateQuery(event, ReviewQueueQuery)
  const out = await reviewQueue(useDb(), user, q)
  if ('refused' in out) {
    if (out.refused === 'section_not_found') throw apiError(404, 'not_found', 'Section not found')
    if (out.refused === 'other_section') throw apiError(403, 'other_section', 'Section leaders review their own section only')
    throw apiError(403, 'forbidden', 'Only section leaders and directors have a review queue')
  }
  setResponseHeader(event, 'Cache-Control', 'no-store')
  return out
})
