import { AdminEnsembleBody } from '../../../../shared/schemas/admin'

// POST /api/admin/ensembles {name, kind, directorEmail} → 201 the ensemble and its first
// director's invitation (mailed; the link is never in the answer).
export default defineEventHandler(async (event) => {
  const admin = await requireSiteAdmin(event)
  const body = await readJsonBody(event, AdminEnsembleBody)
  const db = useDb()
  if (await ensembleNameTaken(db, body.name)) {
    throw apiError(409, 'name_taken', 'An ensemble with this name exists', { issues: [{ path: ['name'], message: 'An ensemble with this name exists', code: 'custom' }] })
  }
  const { ensemble, invitation } = await createEnsembleWithDirector(db, admin.id, body, clientAddress(event), invitationTtlMs())
  // A message that could not go out is logged there; the admin can have it re-sent from the ensemble's invitations.
  await mailInvitations(db, ensemble.id, admin.name, [invitation])
  setResponseStatus(event, 201)
  return { ...ensemble, invitation: { id: invitation.id, email: invitation.email, expiresAt: invitation.expiresAt } }
})
