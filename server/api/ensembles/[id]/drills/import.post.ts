import { z } from 'zod'
import type { DrillImportResult } from '../../../../../shared/types/drill-view'
import { userText } from '../../../../../shared/schemas/text'

const Fields = z.object({ title: userText(120, 0).optional() })

// POST /api/ensembles/:id/drills/import (multipart: `file` = drill JSON or .mid, optional `title`)
// → 201 { id, parts: [names], chords: N } (directors).
export default defineEventHandler(async (event): Promise<DrillImportResult> => {
  const user = await requireUser(event)
  const { id } = validateParams(event, IdParams)
  const db = useDb()
  requireRole(await requireMembership(db, user, id), 'director')
  const form = await receiveSmallFile(event, { fileField: 'file', maxBytes: MAX_DRILL_FILE_BYTES })
  const fields = Fields.safeParse(form.fields)
  if (!fields.success) throw apiError(400, 'invalid_input', 'Invalid input', { issues: formatIssues(fields.error) })
  if (!form.file || form.file.bytes.length === 0) throw apiError(400, 'missing_file', 'No drill file', { field: 'file' })
  const read = drillFromFile(form.file.bytes, fields.data.title || undefined, form.file.name)
  if ('refused' in read) throw apiError(read.refused === 'not_a_drill' ? 415 : 400, read.refused, read.message, read.details)
  const doc = read.document
  let saved
  try {
    saved = await saveDrill(db, id, doc, user.id)
  } catch (err) {
    const e = err as { code?: string, path?: unknown, message?: string }
    if (err instanceof DrillNoteError) throw apiError(400, e.code!, 'Invalid drill file', { message: e.message, path: e.path })
    throw err
  }
  await writeAudit(db, { actorId: user.id, action: 'drill.import', subjectType: 'drill', subjectId: saved.id, ensembleId: id, data: { title: doc.title } })
  setResponseStatus(event, 201)
  return { id: saved.id, parts: doc.parts.map(p => p.name), chords: doc.chords.length }
})
