// POST /api/takes/:id/restore → 200 { id, withdrawnAt: null } (directors only).
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const { id } = validateParams(event, IdParams)
  const db = useDb()
  const access = await requireTakeForUser(db, user, id)
  return restoreTake(db, user, access)
})
