import { SectionDeleteQuery, SectionParams } from '../../../../../shared/schemas/ensemble'

// DELETE /api/ensembles/:id/sections/:sectionId?moveTo= (director) → 204. A section with members
// or assignments needs `moveTo`: nobody is left without a section.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const { id, sectionId } = validateParams(event, SectionParams)
  const { moveTo } = validateQuery(event, SectionDeleteQuery)
  const db = useDb()
  await requireEnsembleRole(db, user, id, 'director')
  const r = await removeSection(db, id, sectionId, actorOf(event, user), moveTo)
  if (!r.ok) throw sectionError(r.code)
  setResponseStatus(event, 204)
  return null
})
