import { TakeFields } from '../../../shared/schemas/take'
import type { TakeCreated } from '../../../shared/types/take'

// POST /api/takes (multipart: drillId, part, optional assignmentId and idempotencyKey, THEN the
// file `audio`) → 202 { id, status: 'queued' }; the same idempotency key again → 200 with the
// first take. The fields and the caller's access are checked before any audio is stored.
export default defineEventHandler(async (event): Promise<TakeCreated> => {
  const user = await requireUser(event)
  const db = useDb()
  const check = async (raw: Record<string, string>) => {
    const parsed = TakeFields.safeParse(raw)
    if (!parsed.success) throw apiError(400, 'invalid_input', 'Invalid input', { issues: formatIssues(parsed.error), order: 'text fields before the audio file' })
    const out = await prepareTake(db, user, parsed.data)
    if ('refused' in out) throw takeRefusedError(out)
    return out
  }
  const limits = takeUploadLimits()
  const store = await useObjectStore().catch(() => { throw apiError(503, 'storage_unavailable', 'Storage unavailable') })
  let prepared: PreparedTake | null = null
  const upload = await receiveUpload(event, store, {
    fileField: 'audio', keyPrefix: 'takes/', maxBytes: limits.maxBytes, maxDurationS: limits.maxDurationS,
    beforeFile: async (fields) => { prepared = await check(fields) },
  })
  prepared ??= await check(upload.fields)
  if (!upload.file) throw apiError(400, 'missing_file', 'No audio file', { field: 'audio' })
  // Refused or failed after the file was stored, or a repeat of an earlier take: keep no orphan object.
  const take = await createTake(db, user.id, prepared, upload.file).catch(async (err) => { await upload.discard(); throw err })
  if ('refused' in take) {
    await upload.discard()
    throw takeRefusedError(take)
  }
  if (!take.created) await upload.discard()
  else wakeAnalysisPool()
  setResponseStatus(event, take.created ? 202 : 200)
  return { id: take.id, status: take.status }
})
