import { AdminUsersQuery } from '../../../../shared/schemas/admin'

// GET /api/admin/users?q=&status=all|active|disabled|admin&page=&pageSize= → { items, total, page, pageSize }
export default defineEventHandler(async (event) => {
  await requireSiteAdmin(event)
  const q = validateQuery(event, AdminUsersQuery)
  const { items, total } = await listUsers(useDb(), q)
  return { items, total, page: q.page, pageSize: q.pageSize }
})
