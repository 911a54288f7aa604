import { RescoreBody } from '../../../../shared/schemas/take'
import type { TakeRescored } from '../../../../shared/types/take'

// POST /api/takes/:id/rescore { system, a4?, tolerance? } → 200 { report }: the stored
// measurement scored against other targets; nothing is decoded or stored.
export default defineEventHandler(async (event): Promise<TakeRescored> => {
  const user = await requireUser(event)
  const { id } = validateParams(event, IdParams)
  const body = await readJsonBody(event, RescoreBody)
  const db = useDb()
  const access = await findTakeForUser(db, user, id)
  if (!access) throw apiError(404, 'not_found', 'Take not found')
  const drill = await loadDrill(db, access.take.drillId)
  if (!drill) throw apiError(404, 'not_found', 'Drill not found')
  const out = await rescoreTake(db, access.take, drill, body)
  if ('report' in out) return out
  switch (out.refused) {
    case 'not_analysed': throw apiError(409, 'not_analysed', 'Take has no measurement yet')
    case 'drill_changed': throw apiError(409, 'drill_changed', 'The drill changed since this take was analysed; re-run the analysis', { takeDrillVersion: out.takeDrillVersion, drillVersion: out.drillVersion })
    case 'invalid_system': throw apiError(400, out.code, 'Invalid tuning system', { message: out.message, path: out.path })
  }
})
