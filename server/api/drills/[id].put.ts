import { DrillUpdateBody } from '../../../shared/schemas/drill'
import type { DrillUpdated } from '../../../shared/types/drill'

// PUT /api/drills/:id { document, version } (director) → 200 { version }; a version other than the
// stored one → 409 version_conflict (nothing saved, `data` says who saved which version).
export default defineEventHandler(async (event): Promise<DrillUpdated> => {
  const user = await requireUser(event)
  const { id } = validateParams(event, IdParams)
  const db = useDb()
  const access = await findDrillForUser(db, user, id)
  if (!access) throw apiError(404, 'not_found', 'Drill not found')
  requireRole(access.membership, 'director')
  const body = await readJsonBody(event, DrillUpdateBody)
  if (access.drill.archivedAt) throw apiError(409, 'drill_archived', 'Drill is archived', { message: 'Restore the drill before editing it.' })
  let result
  try {
    result = await updateDrill(db, access.drill, body.document, body.version, user.id)
  } catch (err) {
    if (err instanceof DrillNoteError) throw apiError(400, err.code, 'Invalid drill', { message: err.message, path: err.path })
    throw err
  }
  if ('conflict' in result) throw apiError(409, 'version_conflict', 'The drill was changed by someone else', { ...result.conflict })
  await writeAudit(db, { actorId: user.id, action: 'drill.update', subjectType: 'drill', subjectId: id, ensembleId: access.drill.ensembleId, data: { version: result.version } })
  return result
})
