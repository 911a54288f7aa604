import { AssignmentParams } from '../../../../../../shared/schemas/assignment'
import type { AssignmentProgress } from '../../../../../../shared/types/assignment'

// GET /api/ensembles/:id/assignments/:assignmentId/progress → { assignment, players: [{ userId, name,
// section, submitted, latestTakeId, meanAbsCents, … }] }: every assignee for a director, the
// assignees now in their own section for a section leader.
export default defineEventHandler(async (event): Promise<AssignmentProgress> => {
  const user = await requireUser(event)
  const { id, assignmentId } = validateParams(event, AssignmentParams)
  const db = useDb()
  const m = await requireEnsembleRole(db, user, id, 'section_leader')
  const r = await assignmentProgress(db, id, assignmentId, m.role === 'director' ? undefined : m.sectionId)
  if (!r) throw apiError(404, 'not_found', 'Assignment not found')
  return r
})
