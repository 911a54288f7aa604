import { AssignmentParams, AssignmentPatch } from '../../../../../shared/schemas/assignment'
import type { AssignmentSummary } from '../../../../../shared/types/assignment'

// PATCH /api/ensembles/:id/assignments/:assignmentId (director) with any field of the form, or
// { archived: true|false } → 200 the assignment. People newly reached get the notice.
export default defineEventHandler(async (event): Promise<AssignmentSummary> => {
  const user = await requireUser(event)
  const { id, assignmentId } = validateParams(event, AssignmentParams)
  const db = useDb()
  await requireEnsembleRole(db, user, id, 'director')
  const body = await readJsonBody(event, AssignmentPatch)
  const r = await updateAssignment(db, id, assignmentId, user.id, body)
  if (!r.ok) throw assignmentError(r)
  const a = await findAssignment(db, id, assignmentId)
  if (!a) throw apiError(404, 'not_found', 'Assignment not found')
  return a
})
