import type { TakeDetail } from '../../../shared/types/take'

// GET /api/takes/:id → status, progress, error, report, who played it and what the caller may do.
export default defineEventHandler(async (event): Promise<TakeDetail> => {
  const user = await requireUser(event)
  const { id } = validateParams(event, IdParams)
  const db = useDb()
  const access = await findTakeForUser(db, user, id)
  if (!access) throw apiError(404, 'not_found', 'Take not found')
  const detail = await takeDetail(db, access, user.id)
  if (!detail) throw apiError(404, 'not_found', 'Take not found')
  setResponseHeader(event, 'Cache-Control', 'no-store')
  return detail
})
