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
  const { ensemble, invitation } = await createEnsembleWithDirector(db, admin.id, body, clientAddress(event))
  const link = invitationLink(String(useRuntimeConfig().baseUrl), invitation.token)
  await sendMail(invitationMail(invitation.email, ensemble.name, 'director', link, admin.name))
    .catch(err => console.error(`[mail] invitation not sent: ${(err as Error).message}`))
  setResponseStatus(event, 201)
  return { ...ensemble, invitation: { id: invitation.id, email: invitation.email, expiresAt: invitation.expiresAt } }
})
