// POST /api/takes/:id/withdraw → 200 { id, withdrawnAt } (the player's own take; kept for the director).
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const { id } = validateParams(event, IdParams)
  const db = useDb()
  const access = await requireTakeForUser(db, user, id)
  return withdrawTake(db, user, access)
})
