import { BulkSendBody } from '../../../../../shared/schemas/ensemble'

// POST /api/ensembles/:id/invitations/bulk (director) { csv, sendGood } → 201 { sent, skipped, invitations }.
// A file with bad rows sends nothing (400 bad_rows with the preview) until sendGood confirms the good ones.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const { id } = validateParams(event, IdParams)
  const db = useDb()
  await requireEnsembleRole(db, user, id, 'director')
  const body = await readJsonBody(event, BulkSendBody)
  const r = await createBulkInvitations(db, id, actorOf(event, user), body.csv, body.sendGood, invitationTtlMs())
  if (!r.ok && 'error' in r) throw apiError(400, r.error.code, r.error.message, { line: r.error.line ?? null })
  if (!r.ok && r.code === 'bad_rows') throw apiError(400, 'bad_rows', `${r.preview.badCount} of ${r.preview.rows.length} rows have problems: nothing was sent`, { preview: r.preview })
  if (!r.ok) throw apiError(400, 'nothing_to_send', 'No row can be sent', { preview: r.preview })
  const failed = await mailInvitations(db, id, user.name, r.issued)
  setResponseStatus(event, 201)
  return { sent: r.issued.length - failed, skipped: r.skipped.length, invitations: r.issued.map(i => ({ id: i.id, email: i.email, expiresAt: i.expiresAt })) }
})
