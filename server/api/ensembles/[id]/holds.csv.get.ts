import { StatsQuery } from '../../../../shared/schemas/stats'
import { statsScope, statsScoring } from '../../../utils/stats-scope'
import { HOLDS_CSV_HEADER, writeHoldsCsv } from '../../../utils/stats-csv'

// GET /api/ensembles/:id/holds.csv?<the stats filters> → text/csv, one row per scored hold,
// streamed in batches so a whole ensemble's year uses little memory.
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
  setResponseHeaders(event, {
    'Content-Type': 'text/csv; charset=utf-8',
    'Content-Disposition': `attachment; filename="driftline-holds-${id}-${new Date().toISOString().slice(0, 10)}.csv"`,
    'Cache-Control': 'private, no-store',
    'X-Csv-Columns': String(HOLDS_CSV_HEADER.length),
  })
  await writeHoldsCsv(db, event.node.res, scope.value, scoring.value)
})
