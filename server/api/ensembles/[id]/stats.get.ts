import { StatsQuery } from '../../../../shared/schemas/stats'
import { ensembleStats, statsScope, statsScoring } from '../../../utils/stats-scope'

// GET /api/ensembles/:id/stats?sectionId=&userId=&drillId=&assignmentId=&from=&to=&system=&a4=&tolerance=
// → the figures over the analysed, not withdrawn takes the caller may see (shared/types/stats.ts).
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const { id } = validateParams(event, IdParams)
  const query = validateQuery(event, StatsQuery)
  const db = useDb()
  const membership = await membershipFor(db, user, id)
  if (!membership) throw apiError(404, 'not_found', 'Ensemble not found')
  const scope = await statsScope(db, membership, query)
  if (!scope.ok) throw apiError(scope.status, scope.code, scope.message, scope.details)
  const scoring = statsScoring(query)
  if (!scoring.ok) throw apiError(scoring.status, scoring.code, scoring.message, scoring.details)
  return ensembleStats(db, scope.value, scoring.value)
})
