import { SectionCreate } from '../../../../../shared/schemas/ensemble'

// POST /api/ensembles/:id/sections (director) { name, instrument? } → 201 the section.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const { id } = validateParams(event, IdParams)
  const db = useDb()
  await requireEnsembleRole(db, user, id, 'director')
  const body = await readJsonBody(event, SectionCreate)
  const r = await createSection(db, id, actorOf(event, user), body)
  if (!r.ok) throw sectionError(r.code)
  setResponseStatus(event, 201)
  return r.section
})
