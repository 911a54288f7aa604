import { StatsQuery } from '../../../../shared/schemas/stats'
import type { ChartSeries } from '../../../../shared/types/charts'
import { statsScope, statsScoring } from '../../../utils/stats-scope'
import { chartSeries } from '../../../utils/stats-charts'

// GET /api/ensembles/:id/charts?<the stats filters> → the chart series (shared/types/charts.ts)
// under the same access rules as /stats: players their own, section leaders their section,
// directors everything.
export default defineEventHandler(async (event): Promise<ChartSeries> => {
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
  return chartSeries(db, scope.value, scoring.value)
})
