// GET /api/ensembles/:id → the ensemble's settings and sections (any member; 404 to anyone else).
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const { id } = validateParams(event, IdParams)
  const db = useDb()
  const m = await requireMembership(db, user, id)
  const detail = await getEnsembleDetail(db, id, m.viaSiteAdmin ? 'admin' : m.role)
  if (!detail) throw apiError(404, 'not_found', 'Ensemble not found')
  return detail
})
