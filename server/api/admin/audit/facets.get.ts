// GET /api/admin/audit/facets → { actions, actors: [{id, name, email}], ensembles: [{id, name}] } for the filters.
export default defineEventHandler(async (event) => {
  await requireSiteAdmin(event)
  return auditFacets(useDb())
})
