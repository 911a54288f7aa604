import { AssignmentListQuery } from '../../../../../shared/schemas/assignment'
import type { AssignmentList } from '../../../../../shared/types/assignment'

// GET /api/ensembles/:id/assignments?archived=include|only&drillId=&page=&pageSize= (directors and
// section leaders) → { items, total, page, pageSize }, latest due date first.
export default defineEventHandler(async (event): Promise<AssignmentList> => {
  const user = await requireUser(event)
  const { id } = validateParams(event, IdParams)
  const db = useDb()
  await requireEnsembleRole(db, user, id, 'section_leader')
  return listAssignments(db, id, validateQuery(event, AssignmentListQuery))
})
