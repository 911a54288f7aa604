import { StatsQuery } from '../../../../shared/schemas/stats'
import type { ChartSeries } from '../../../../shared/types/charts'
import { cachedFigures, statsRequest } from '../../../utils/stats-scope'
import { chartSeries } from '../../../utils/stats-charts'

// GET /api/ensembles/:id/charts?<the stats filters> → the chart series (shared/types/charts.ts)
// under the same access rules as /stats: players their own, section leaders their section,
// directors everything. Cached like the statistics until the figures' tables change.
export default defineEventHandler(async (event): Promise<ChartSeries> => {
  const user = await requireUser(event)
  const { id } = validateParams(event, IdParams)
  const db = useDb()
  const request = await statsRequest(db, user, id, validateQuery(event, StatsQuery))
  if (!request.ok) throw apiError(request.status, request.code, request.message, request.details)
  const { filters, scoring } = request.value
  return cachedFigures('charts', db, filters, scoring, () => chartSeries(db, filters, scoring))
})
