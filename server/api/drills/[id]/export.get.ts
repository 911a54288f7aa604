import { z } from 'zod'
import { DRILL_EXPORT_FORMATS } from '../../../../shared/types/drill-import'

const Query = z.object({
  format: z.enum(DRILL_EXPORT_FORMATS),
  /** MusicXML only: transposing parts at written pitch (default) or every part at concert pitch. */
  pitch: z.enum(['written', 'concert']).default('written'),
})

// GET /api/drills/:id/export?format=musicxml|midi|json → the file, with its content type and a file name (members).
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const { id } = validateParams(event, IdParams)
  const { format, pitch } = validateQuery(event, Query)
  const access = await findDrillForUser(useDb(), user, id)
  if (!access) throw apiError(404, 'not_found', 'Drill not found')
  const file = drillExport(access.drill.document, format, pitch)
  setResponseHeader(event, 'Content-Type', file.type)
  setResponseHeader(event, 'Content-Disposition', attachment(file.fileName))
  setResponseHeader(event, 'Cache-Control', 'private, no-store')
  return typeof file.body === 'string' ? file.body : Buffer.from(file.body)
})
