import { AdminEnsemblePatch } from '../../../../shared/schemas/admin'

// PATCH /api/admin/ensembles/:id {archived} → 200 and the ensemble (archive or restore).
export default defineEventHandler(async (event) => {
  const admin = await requireSiteAdmin(event)
  const { id } = validateParams(event, IdParams)
  const { archived } = await readJsonBody(event, AdminEnsemblePatch)
  const ensemble = await setEnsembleArchived(useDb(), admin.id, id, archived, clientAddress(event))
  if (!ensemble) throw apiError(404, 'not_found', 'Ensemble not found')
  return ensemble
})
