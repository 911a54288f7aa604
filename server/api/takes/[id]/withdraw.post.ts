import type { TakeWithdrawal } from '../../../../shared/types/take'

// POST /api/takes/:id/withdraw → 200 { id, withdrawnAt } (the player's own take; kept for the director).
export default defineEventHandler(async (event): Promise<TakeWithdrawal> => {
  const user = await requireUser(event)
  const { id } = validateParams(event, IdParams)
  const db = useDb()
  const access = await findTakeForUser(db, user, id)
  if (!access) throw apiError(404, 'not_found', 'Take not found')
  if (!access.isOwner) throw apiError(403, 'forbidden', 'Only the player can withdraw a take')
  if (access.take.withdrawnAt) throw apiError(409, 'already_withdrawn', 'Take already withdrawn')
  return withdrawTake(db, user.id, access.take)
})
