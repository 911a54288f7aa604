// GET /api/takes/:id → status, progress, error, report and what the caller may do with the take.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const { id } = validateParams(event, IdParams)
  const db = useDb()
  const access = await requireTakeForUser(db, user, id)
  setResponseHeader(event, 'Cache-Control', 'no-store')
  return takeDetail(db, access)
})
