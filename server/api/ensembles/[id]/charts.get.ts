import type { ChartSeries } from '../../../../shared/types/charts'
import { statsRequest } from '../../../utils/stats-scope'
import { chartSeries } from '../../../utils/stats-charts'

// GET /api/ensembles/:id/charts?<the stats filters> → the chart series (shared/types/charts.ts)
// under the same access rules as /stats: players their own, section leaders their section,
// directors everything.
export default defineEventHandler(async (event): Promise<ChartSeries> => {
  const { db, filters, scoring } = await statsRequest(event)
  return chartSeries(db, filters, scoring)
})
