// POST /api/takes/:id/reanalyse → 202 { status: 'queued' } (the player or a director; 409 while
// an analysis is queued or running).
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const { id } = validateParams(event, IdParams)
  const db = useDb()
  const access = await findTakeForUser(db, user, id)
  if (!access) throw apiError(404, 'not_found', 'Take not found')
  if (!access.isOwner && !access.isDirector) throw apiError(403, 'forbidden', 'Not allowed')
  const drill = await loadDrill(db, access.take.drillId)
  if (!drill) throw apiError(404, 'not_found', 'Drill not found')
  const out = await reanalyseTake(db, user.id, access.take, drill)
  if (!out) throw apiError(409, 'analysis_in_progress', 'Analysis already queued or running')
  wakeAnalysisPool()
  setResponseStatus(event, 202)
  return { status: out.status }
})
