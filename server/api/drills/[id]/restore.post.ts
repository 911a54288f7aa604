import type { DrillArchiveState } from '../../../../shared/types/drill'

// POST /api/drills/:id/restore (director) → 200 { id, archivedAt }; the drill's takes are kept.
export default defineEventHandler(async (event): Promise<DrillArchiveState> => {
  const user = await requireUser(event)
  const { id } = validateParams(event, IdParams)
  const db = useDb()
  const access = await findDrillForUser(db, user, id)
  if (!access) throw apiError(404, 'not_found', 'Drill not found')
  requireRole(access.membership, 'director')
  const state = await setDrillArchived(db, id, false, user.id)
  await writeAudit(db, { actorId: user.id, action: 'drill.restore', subjectType: 'drill', subjectId: id, ensembleId: access.drill.ensembleId })
  return state
})
