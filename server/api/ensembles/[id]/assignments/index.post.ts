import { AssignmentCreate } from '../../../../../shared/schemas/assignment'
import type { AssignmentCreated } from '../../../../../shared/types/assignment'

// POST /api/ensembles/:id/assignments (director) { drillId, sectionIds, userIds, dueAt, instructions,
// attempts, title?, sectionParts?, userParts? } → 201 { id, assignees }; each assignee is mailed once.
export default defineEventHandler(async (event): Promise<AssignmentCreated> => {
  const user = await requireUser(event)
  const { id } = validateParams(event, IdParams)
  const db = useDb()
  await requireEnsembleRole(db, user, id, 'director')
  const body = await readJsonBody(event, AssignmentCreate)
  const r = await createAssignment(db, id, user.id, body)
  if (!r.ok) throw assignmentError(r)
  setResponseStatus(event, 201)
  return { id: r.id, assignees: r.assignees }
})
