import { DrillListQuery } from '../../../../../shared/schemas/drill'
import type { DrillListItem } from '../../../../../shared/types/drill-view'

// GET /api/ensembles/:id/drills?q=&status=active|archived|all → DrillListItem[] (members;
// archived drills for directors only).
export default defineEventHandler(async (event): Promise<DrillListItem[]> => {
  const user = await requireUser(event)
  const { id } = validateParams(event, IdParams)
  const query = validateQuery(event, DrillListQuery)
  const db = useDb()
  const membership = await requireMembership(db, user, id) // 404 when not a member
  if (query.status !== 'active') requireRole(membership, 'director')
  return searchEnsembleDrills(db, id, query)
})
