import type { DrillCreated } from '../../../../shared/types/drill'

// POST /api/drills/:id/duplicate (director) → 201 { id, version } of the copy.
export default defineEventHandler(async (event): Promise<DrillCreated> => {
  const user = await requireUser(event)
  const { id } = validateParams(event, IdParams)
  const db = useDb()
  const access = await findDrillForUser(db, user, id)
  if (!access) throw apiError(404, 'not_found', 'Drill not found')
  requireRole(access.membership, 'director')
  const copy = await duplicateDrill(db, access.drill, user.id)
  await writeAudit(db, { actorId: user.id, action: 'drill.duplicate', subjectType: 'drill', subjectId: copy.id, ensembleId: access.drill.ensembleId, data: { from: id } })
  setResponseStatus(event, 201)
  return copy
})
