import { BulkPreviewBody } from '../../../../../shared/schemas/ensemble'

// POST /api/ensembles/:id/invitations/bulk-preview (director) { csv } → { rows, goodCount, badCount, delimiter }.
// Nothing is stored or sent. A file that cannot be read at all → 400 with the reason in data.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const { id } = validateParams(event, IdParams)
  const db = useDb()
  await requireEnsembleRole(db, user, id, 'director')
  const body = await readJsonBody(event, BulkPreviewBody)
  const r = await previewBulkInvitations(db, id, body.csv)
  if (!r.ok) throw apiError(400, r.error.code, r.error.message, { line: r.error.line ?? null })
  return r.preview
})
