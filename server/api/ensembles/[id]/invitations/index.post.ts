import { InvitationCreate } from '../../../../../shared/schemas/ensemble'

// POST /api/ensembles/:id/invitations (director) { email, role, sectionId, name? } → 201 { id, email, expiresAt };
// the message holds one link, {baseUrl}/invitations/{token}. An address already in the ensemble → 409 already_member.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const { id } = validateParams(event, IdParams)
  const db = useDb()
  await requireEnsembleRole(db, user, id, 'director')
  const body = await readJsonBody(event, InvitationCreate)
  const r = await inviteToEnsemble(db, id, actorOf(event, user), { email: body.email, role: body.role, sectionId: body.sectionId ?? null, name: body.name }, invitationTtlMs())
  if (!r.ok && r.code === 'already_member') throw apiError(409, 'already_member', 'This address is already a member of the ensemble', { issues: [{ path: ['email'], message: 'Already a member of this ensemble', code: 'already_member' }] })
  if (!r.ok) throw apiError(400, 'invalid_input', 'Invalid input', { issues: [{ path: ['sectionId'], message: 'That section is not in this ensemble', code: 'section_not_found' }] })
  if (await mailInvitations(db, id, user.name, [r.invitation])) {
    throw apiError(502, 'mail_not_sent', 'The invitation is saved but the message could not be sent: try Resend', { id: r.invitation.id })
  }
  setResponseStatus(event, 201)
  return { id: r.invitation.id, email: r.invitation.email, expiresAt: r.invitation.expiresAt }
})
