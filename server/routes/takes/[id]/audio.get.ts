// GET (and HEAD: audio.head.ts) /takes/:id/audio → the original upload, with one byte range per
// request (206), to the people who may hear it (the player, their section leader, directors,
// site admins); 404 to anyone else.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event).catch(() => null)
  const { id } = validateParams(event, IdParams)
  const access = user ? await findTakeForUser(useDb(), user, id) : null
  if (!access) throw apiError(404, 'not_found', 'Not found')
  const store = await useObjectStore()
  const key = access.take.objectKey
  const size = access.take.bytes ?? (await store.head(key))?.contentLength ?? null
  if (size == null) throw apiError(404, 'not_found', 'Not found')
  setResponseHeaders(event, {
    'Content-Type': access.take.mime ?? 'application/octet-stream',
    'Accept-Ranges': 'bytes',
    'Cache-Control': 'private, no-store',
    'Content-Disposition': `inline; filename="take-${id}"`,
  })
  const range = parseByteRange(getRequestHeader(event, 'range'), size)
  if (range === 'unsatisfiable') {
    setResponseStatus(event, 416)
    setResponseHeader(event, 'Content-Range', `bytes */${size}`)
    return ''
  }
  const want = range ?? { start: 0, end: size - 1 }
  setResponseStatus(event, range ? 206 : 200)
  setResponseHeader(event, 'Content-Length', want.end - want.start + 1)
  if (range) setResponseHeader(event, 'Content-Range', `bytes ${want.start}-${want.end}/${size}`)
  if (event.method === 'HEAD') {
    event.node.res.end() // the headers above, no body
    return null
  }
  let obj
  try {
    obj = await store.get(key, range ? { range: `bytes=${want.start}-${want.end}` } : {})
  } catch (err) {
    if (err instanceof RangeNotSatisfiableError) throw apiError(404, 'not_found', 'Not found')
    throw err
  }
  if (!obj) throw apiError(404, 'not_found', 'Not found')
  return sendStream(event, range ? exactRange(obj.body, parseContentRange(obj.contentRange), want) : obj.body)
})
