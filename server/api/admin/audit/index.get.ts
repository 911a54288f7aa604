import { AuditQuery } from '../../../../shared/schemas/admin'

// GET /api/admin/audit?action=&actorId=&ensembleId=&page=&pageSize= → { items, total, page, pageSize }, newest first.
export default defineEventHandler(async (event) => {
  await requireSiteAdmin(event)
  const q = validateQuery(event, AuditQuery)
  const { items, total } = await listAuditPage(useDb(), {
    action: q.action || undefined,
    actorId: q.actorId || undefined,
    ensembleId: q.ensembleId || undefined,
    page: q.page,
    pageSize: q.pageSize,
  })
  return { items, total, page: q.page, pageSize: q.pageSize }
})
