import type { ChartChoices } from '../../../../../shared/types/charts'
import { chartChoices } from '../../../../utils/stats-charts'

// GET /api/ensembles/:id/charts/choices → what the caller may chart (shared/types/charts.ts):
// directors every section and player, section leaders their section, players themselves.
export default defineEventHandler(async (event): Promise<ChartChoices> => {
  const user = await requireUser(event)
  const { id } = validateParams(event, IdParams)
  const db = useDb()
  const membership = await membershipFor(db, user, id)
  if (!membership) throw apiError(404, 'not_found', 'Ensemble not found')
  return chartChoices(db, membership)
})
