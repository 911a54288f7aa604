// GET /api/takes/:id/events → server-sent events `status` {status, progress, error} until the
// take is analysed or failed. Live from the analysis pool, with a database check as a backstop.
const SETTLED = new Set(['analysed', 'failed'])
const RANK: Record<string, number> = { queued: 0, analysing: 1, analysed: 2, failed: 2 }

export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const { id } = validateParams(event, IdParams)
  const db = useDb()
  if (!await findTakeForUser(db, user, id)) throw apiError(404, 'not_found', 'Take not found')

  const stream = createEventStream(event)
  let closed = false
  let stop = () => {}
  let timer: ReturnType<typeof setInterval> | undefined
  const finish = async () => {
    if (closed) return
    closed = true
    stop()
    clearInterval(timer)
    await stream.close()
  }
  let lastStatus = ''
  let lastProgress = -1
  const send = async (s: { status: string, progress: number, error: unknown }, fromDb = false) => {
    if (closed || (s.status === lastStatus && s.progress <= lastProgress)) return
    // The database copy lags the live events: from it, only news that moves forward.
    if (fromDb && lastStatus && (RANK[s.status] ?? 0) < (RANK[lastStatus] ?? 0)) return
    lastStatus = s.status
    lastProgress = s.progress
    const data = JSON.stringify({ status: s.status, progress: Math.round(s.progress * 1000) / 1000, error: s.error })
    await stream.push({ event: 'status', data })
    if (SETTLED.has(s.status)) await finish()
  }
  const check = async () => {
    const s = await takeLiveState(db, id).catch(() => null)
    if (s) await send(s, true)
  }
  stop = onTakeEvent(id, (e) => { void send(e) })
  timer = setInterval(() => { void check() }, 2000)
  stream.onClosed(finish)
  void check()
  return stream.send()
})
