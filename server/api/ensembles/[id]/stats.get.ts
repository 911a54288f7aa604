import { ensembleStats, statsRequest } from '../../../utils/stats-scope'

// GET /api/ensembles/:id/stats?sectionId=&userId=&drillId=&assignmentId=&from=&to=&system=&a4=&tolerance=
// → the figures over the analysed, not withdrawn takes the caller may see (shared/types/stats.ts).
export default defineEventHandler(async (event) => {
  const { db, filters, scoring } = await statsRequest(event)
  return ensembleStats(db, filters, scoring)
})
