import { SectionOrder } from '../../../../../shared/schemas/ensemble'

// POST /api/ensembles/:id/sections/order (director) { ids: every section id in the new order } → the sections.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const { id } = validateParams(event, IdParams)
  const db = useDb()
  await requireEnsembleRole(db, user, id, 'director')
  const body = await readJsonBody(event, SectionOrder)
  const r = await reorderSections(db, id, actorOf(event, user), body.ids)
  if (!r.ok) throw sectionError(r.code)
  return r.sections
})
