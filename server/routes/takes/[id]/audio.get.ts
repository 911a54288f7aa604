// GET /takes/:id/audio → the original upload, with Range requests (206), to the people who may
// hear it (the player, their section leader, directors, site admins); 404 to anyone else.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event).catch(() => null)
  const { id } = validateParams(event, IdParams)
  const db = useDb()
  const access = user ? await findTakeForUser(db, user, id) : null
  if (!access) throw apiError(404, 'not_found', 'Not found')
  const size = access.take.bytes
  const range = normaliseRange(getRequestHeader(event, 'range'), size)
  const unsatisfiable = (total: number | null) => {
    setResponseStatus(event, 416)
    if (total != null) setResponseHeader(event, 'Content-Range', `bytes */${total}`)
    return ''
  }
  if (range === 'unsatisfiable') return unsatisfiable(size)
  const store = await useObjectStore()
  let obj
  try {
    obj = await store.get(access.take.objectKey, range ? { range } : {})
  } catch (err) {
    if (err instanceof RangeNotSatisfiableError) return unsatisfiable(err.totalBytes)
    throw err
  }
  if (!obj) throw apiError(404, 'not_found', 'Not found')
  setResponseStatus(event, obj.status)
  setResponseHeaders(event, {
    'Content-Type': access.take.mime ?? obj.contentType ?? 'application/octet-stream',
    'Content-Length': String(obj.contentLength),
    'Accept-Ranges': 'bytes',
    'Cache-Control': 'private, no-store',
    'Content-Disposition': `inline; filename="take-${id}"`,
    ...(obj.contentRange ? { 'Content-Range': obj.contentRange } : {}),
  })
  return sendStream(event, obj.body)
})
