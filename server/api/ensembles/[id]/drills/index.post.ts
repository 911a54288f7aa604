import { DrillDocument } from '../../../../../shared/drill/schema'
import type { DrillCreated } from '../../../../../shared/types/drill'

// POST /api/ensembles/:id/drills (director) with a drill document → 201 { id, version }.
export default defineEventHandler(async (event): Promise<DrillCreated> => {
  const user = await requireUser(event)
  const { id } = validateParams(event, IdParams)
  const db = useDb()
  requireRole(await requireMembership(db, user, id), 'director')
  const doc = await readJsonBody(event, DrillDocument)
  let saved
  try {
    saved = await saveDrill(db, id, doc, user.id)
  } catch (err) {
    if (err instanceof DrillNoteError) throw apiError(400, err.code, 'Invalid drill', { message: err.message, path: err.path })
    throw err
  }
  await writeAudit(db, { actorId: user.id, action: 'drill.create', subjectType: 'drill', subjectId: saved.id, ensembleId: id, data: { title: doc.title } })
  setResponseStatus(event, 201)
  return saved
})
