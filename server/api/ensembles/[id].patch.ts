import { EnsemblePatch } from '../../../shared/schemas/ensemble'

// PATCH /api/ensembles/:id (director) with any of name, kind, a4, system, systemOptions, tolerance → the ensemble.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const { id } = validateParams(event, IdParams)
  const db = useDb()
  const m = await requireEnsembleRole(db, user, id, 'director')
  const { system, systemOptions, ...settings } = await readJsonBody(event, EnsemblePatch)
  const current = await getEnsembleDetail(db, id, 'director')
  if (!current) throw apiError(404, 'not_found', 'Ensemble not found')
  let merged = null
  if (system !== undefined || systemOptions !== undefined) {
    const r = mergeSystem({ name: current.system, ...current.systemOptions }, { system, systemOptions })
    if (!r.ok) throw apiError(400, 'invalid_input', 'Invalid input', { issues: r.issues })
    merged = r.system
  }
  if (!await updateEnsembleSettings(db, id, actorOf(event, user), settings, merged)) throw apiError(404, 'not_found', 'Ensemble not found')
  return getEnsembleDetail(db, id, m.viaSiteAdmin ? 'admin' : m.role)
})
