// GET /api/ensembles/:id/drills → [{ id, title, key, tempo, a4, system, tolerance, parts, chords, createdAt }]
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const { id } = validateParams(event, IdParams)
  const db = useDb()
  await requireMembership(db, user, id) // 404 when not a member
  return listEnsembleDrills(db, id)
})
