import { DrillImportFields } from '../../../../../shared/schemas/drill-import'
import type { DrillImportPreview } from '../../../../../shared/types/drill-import'
import type { DrillImportResult } from '../../../../../shared/types/drill-view'

// POST /api/ensembles/:id/drills/import (multipart: `file` = MusicXML, .mxl, MIDI or drill JSON;
// optional `title`, `bars` like 3-6, `parts` renaming imported parts, `preview`)
// → 201 { id, parts, chords, warnings }; with preview=1 → 200 the parsed drill, nothing saved (directors).
export default defineEventHandler(async (event): Promise<DrillImportResult | DrillImportPreview> => {
  const user = await requireUser(event)
  const { id } = validateParams(event, IdParams)
  const db = useDb()
  requireRole(await requireMembership(db, user, id), 'director')
  const form = await receiveSmallFile(event, { fileField: 'file', maxBytes: MAX_DRILL_FILE_BYTES })
  const fields = DrillImportFields.safeParse(form.fields)
  if (!fields.success) throw apiError(400, 'invalid_input', 'Invalid input', { issues: formatIssues(fields.error) })
  if (!form.file || form.file.bytes.length === 0) throw apiError(400, 'missing_file', 'No drill file', { field: 'file' })
  const { title, bars, parts: names, preview } = fields.data
  const read = drillFromFile(form.file.bytes, { fileName: form.file.name, title, bars, names })
  if ('refused' in read) throw apiError(read.refused === 'not_a_drill' ? 415 : 400, read.refused, read.message, read.details)
  const { format, drill, warnings } = read
  const partNames = drill.parts.map(p => p.name)
  if (preview === '1' || preview === 'true') return { preview: true, format, drill, warnings, parts: partNames, chords: drill.chords.length, sections: await sectionNames(db, id) }
  let saved
  try {
    saved = await saveDrill(db, id, drill, user.id)
  } catch (err) {
    if (err instanceof DrillNoteError) throw apiError(400, err.code, 'Invalid drill file', { message: err.message, path: err.path })
    throw err
  }
  await writeAudit(db, { actorId: user.id, action: 'drill.import', subjectType: 'drill', subjectId: saved.id, ensembleId: id, data: { title: drill.title, format } })
  setResponseStatus(event, 201)
  return { id: saved.id, parts: partNames, chords: drill.chords.length, warnings }
})
