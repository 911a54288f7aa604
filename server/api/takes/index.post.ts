// POST /api/takes (multipart: drillId, part, optional assignmentId and idempotencyKey, file `audio`)
// → 202 { id, status: 'queued' }; the same idempotency key again → 200 with the first take.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const config = useRuntimeConfig().analysis
  const store = await useObjectStore().catch(() => {
    throw apiError(503, 'storage_unavailable', 'Storage unavailable')
  })
  const upload = await receiveUpload(event, store, {
    fileField: 'audio',
    maxBytes: Number(config.maxUploadBytes),
    maxDurationS: Number(config.maxDurationS),
    keyPrefix: 'takes/',
  })
  let take
  try {
    take = await submitTake(useDb(), user, upload.fields, upload.file)
  } catch (err) {
    await upload.discard() // refused after the file was stored: keep no orphan object
    throw err
  }
  if (!take.created) {
    await upload.discard()
    setResponseStatus(event, 200)
  } else {
    wakeAnalysisPool()
    setResponseStatus(event, 202)
  }
  return { id: take.id, status: take.status }
})
