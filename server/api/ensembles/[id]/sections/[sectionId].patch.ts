import { SectionParams, SectionPatch } from '../../../../../shared/schemas/ensemble'

// PATCH /api/ensembles/:id/sections/:sectionId (director) { name?, instrument? } → the section.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const { id, sectionId } = validateParams(event, SectionParams)
  const db = useDb()
  await requireEnsembleRole(db, user, id, 'director')
  const body = await readJsonBody(event, SectionPatch)
  const r = await updateSection(db, id, sectionId, actorOf(event, user), body)
  if (!r.ok) throw sectionError(r.code)
  return r.section
})
