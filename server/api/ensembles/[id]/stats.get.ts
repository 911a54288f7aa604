import { StatsQuery } from '../../../../shared/schemas/stats'
import { ensembleStats, statsRequest } from '../../../utils/stats-scope'

// GET /api/ensembles/:id/stats?sectionId=&userId=&drillId=&assignmentId=&from=&to=&system=&a4=&tolerance=
// → the figures over the analysed, not withdrawn takes the caller may see (shared/types/stats.ts).
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const { id } = validateParams(event, IdParams)
  const db = useDb()
  const request = await statsRequest(db, user, id, validateQuery(event, StatsQuery))
  if (!request.ok) throw apiError(request.status, request.code, request.message, request.details)
  const { filters, scoring } = request.value
  return ensembleStats(db, filters, scoring)
})
