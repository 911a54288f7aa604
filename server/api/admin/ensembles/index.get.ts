import { AdminEnsemblesQuery } from '../../../../shared/schemas/admin'

// GET /api/admin/ensembles?q=&archived=all|open|archived&page=&pageSize= → { items, total, page, pageSize }
export default defineEventHandler(async (event) => {
  await requireSiteAdmin(event)
  const q = validateQuery(event, AdminEnsemblesQuery)
  const { items, total } = await listAdminEnsembles(useDb(), q)
  return { items, total, page: q.page, pageSize: q.pageSize }
})
