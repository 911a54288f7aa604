import type { DrillDefaults } from '../../../../../shared/types/drill'

// GET /api/ensembles/:id/drills/defaults (director) → where a new drill starts: the ensemble's
// reference pitch, tolerance and system, one part per section.
export default defineEventHandler(async (event): Promise<DrillDefaults> => {
  const user = await requireUser(event)
  const { id } = validateParams(event, IdParams)
  const db = useDb()
  requireRole(await requireMembership(db, user, id), 'director')
  const defaults = await drillDefaults(db, id)
  if (!defaults) throw apiError(404, 'not_found', 'Ensemble not found')
  return defaults
})
