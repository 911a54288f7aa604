import { StatsQuery } from '../../../../shared/schemas/stats'
import { statsRequest } from '../../../utils/stats-scope'
import { HOLDS_CSV_HEADER, writeHoldsCsv } from '../../../utils/stats-csv'

// GET /api/ensembles/:id/holds.csv?<the stats filters> → text/csv, one row per scored hold,
// streamed in batches so a whole ensemble's year uses little memory.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const { id } = validateParams(event, IdParams)
  const db = useDb()
  const request = await statsRequest(db, user, id, validateQuery(event, StatsQuery))
  if (!request.ok) throw apiError(request.status, request.code, request.message, request.details)
  const { filters, scoring } = request.value
  setResponseHeaders(event, {
    'Content-Type': 'text/csv; charset=utf-8',
    'Content-Disposition': `attachment; filename="driftline-holds-${id}-${new Date().toISOString().slice(0, 10)}.csv"`,
    'Cache-Control': 'private, no-store',
    'X-Csv-Columns': String(HOLDS_CSV_HEADER.length),
  })
  await writeHoldsCsv(db, event.node.res, filters, scoring)
})
