import type { ReviewSaved } from '../../../../shared/types/review'
import { ReviewBody } from '../../../../shared/schemas/review'

// POST /api/takes/:id/reviews → 201 { id, created: true } for the reviewer's first review of the
// take, 200 { id, created: false } when it replaces their earlier one (notes sent replace theirs).
export default defineEventHandler(async (event): Promise<ReviewSaved> => {
  const user = await requireUser(event)
  const { id } = validateParams(event, IdParams)
  const db = useDb()
  const access = await reviewAccess(db, user, id)
  if (!access.ok) {
    if (access.refused === 'not_found') throw apiError(404, 'not_found', 'Take not found')
    if (access.refused === 'own_take') throw apiError(403, 'own_take', 'You cannot review your own take')
    if (access.refused === 'other_section') throw apiError(403, 'other_section', 'Only the leader of the player’s section or a director can review this take')
    throw apiError(403, 'forbidden', 'Only section leaders and directors review takes')
  }
  const body = await readJsonBody(event, ReviewBody).catch((err) => { throw namedNoteError(err) })
  const { take } = access
  if (take.withdrawnAt) throw apiError(409, 'take_withdrawn', 'The take is withdrawn')
  if (take.status === 'queued' || take.status === 'analysing') throw apiError(409, 'take_analysing', 'The take is still being analysed', { status: take.status })
  const timeline = await takeTimeline(db, take)
  const problem = notePlacementProblem(body.notes, timeline.durationS)
  if (problem) {
    const message = problem.code === 'no_timeline' ? `Note ${problem.index + 1} is pinned to a moment, but this take has no timeline` : `Note ${problem.index + 1} is pinned after the end of the take`
    throw apiError(400, problem.code, message, { noteIndex: problem.index, path: ['notes', problem.index, 'atS'], atS: problem.atS, durationS: problem.durationS })
  }
  const saved = await saveReview(db, user.id, take, body, timeline.holds)
  // The answer does not wait for the mail; a failed send is logged.
  void mailReview(db, saved.id, !saved.created)
  setResponseStatus(event, saved.created ? 201 : 200)
  return { id: saved.id, created: saved.created }
})
