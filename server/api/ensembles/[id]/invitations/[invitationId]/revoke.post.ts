import { InvitationParams } from '../../../../../../shared/schemas/ensemble'

// POST /api/ensembles/:id/invitations/:invitationId/revoke (director) → { ok }; the link then answers 410.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const { id, invitationId } = validateParams(event, InvitationParams)
  const db = useDb()
  await requireEnsembleRole(db, user, id, 'director')
  const r = await revokeInvitation(db, id, invitationId, actorOf(event, user))
  if (!r.ok && r.code === 'not_found') throw apiError(404, 'not_found', 'Invitation not found')
  if (!r.ok) throw apiError(409, 'invitation_closed', 'This invitation was already accepted or revoked')
  return { ok: true }
})
