import type { TakeWithdrawal } from '../../../../shared/types/take'

// POST /api/takes/:id/restore → 200 { id, withdrawnAt: null } (directors only).
export default defineEventHandler(async (event): Promise<TakeWithdrawal> => {
  const user = await requireUser(event)
  const { id } = validateParams(event, IdParams)
  const db = useDb()
  const access = await findTakeForUser(db, user, id)
  if (!access) throw apiError(404, 'not_found', 'Take not found')
  if (!access.isDirector) throw apiError(403, 'forbidden', 'Only a director can restore a take')
  if (!access.take.withdrawnAt) throw apiError(409, 'not_withdrawn', 'Take is not withdrawn')
  return restoreTake(db, user.id, access.take)
})
