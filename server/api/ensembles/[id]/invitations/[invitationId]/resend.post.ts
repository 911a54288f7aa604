import { InvitationParams } from '../../../../../../shared/schemas/ensemble'

// POST /api/ensembles/:id/invitations/:invitationId/resend (director) → { id, email, expiresAt }: a new
// link valid for the full period; the old link stops working.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const { id, invitationId } = validateParams(event, InvitationParams)
  const db = useDb()
  await requireEnsembleRole(db, user, id, 'director')
  const r = await resendInvitation(db, id, invitationId, actorOf(event, user), invitationTtlMs())
  if (!r.ok && r.code === 'not_found') throw apiError(404, 'not_found', 'Invitation not found')
  if (!r.ok && r.code === 'already_member') throw apiError(409, 'already_member', 'This address is already a member of the ensemble')
  if (!r.ok) throw apiError(409, 'invitation_closed', 'This invitation was already accepted or revoked')
  if (await mailInvitations(db, id, user.name, [r.invitation])) throw apiError(502, 'mail_not_sent', 'The message could not be sent: try again later', { id: r.invitation.id })
  return { id: r.invitation.id, email: r.invitation.email, expiresAt: r.invitation.expiresAt }
})
