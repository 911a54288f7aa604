import { SectionMerge, SectionParams } from '../../../../../../shared/schemas/ensemble'

// POST /api/ensembles/:id/sections/:sectionId/merge (director) { intoId, name? } → the section that stays.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const { id, sectionId } = validateParams(event, SectionParams)
  const db = useDb()
  await requireEnsembleRole(db, user, id, 'director')
  const body = await readJsonBody(event, SectionMerge)
  const r = await mergeSections(db, id, sectionId, body.intoId, actorOf(event, user), body.name)
  if (!r.ok) throw sectionError(r.code)
  return r.section
})
