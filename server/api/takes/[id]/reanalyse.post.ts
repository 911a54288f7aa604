import { reanalyseTake } from '../../../utils/takes'

// POST /api/takes/:id/reanalyse → 202 { status: 'queued' } (the player or a director; 409 while
// an analysis is queued or running).
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const { id } = validateParams(event, IdParams)
  const db = useDb()
  const access = await requireTakeForUser(db, user, id)
  const out = await reanalyseTake(db, user, access)
  wakeAnalysisPool()
  setResponseStatus(event, 202)
  return { status: out.status }
})
